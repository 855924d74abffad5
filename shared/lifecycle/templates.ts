/**
 * Ready-made life cycles for the editor: age-classified (Leslie) and
 * stage-classified structures, and a life cycle drawn from a matrix.
 */
import { newId as randomId, type IdPrefix } from "./ids";
import { LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, MAX_STAGES, type Census, type LifeCycle, type LifeCycleInput } from "./schema";

export interface TemplateOptions {
  /** Life-cycle name; each template has a default. */
  name?: string;
  /** Default "pre-breeding". */
  census?: Census;
  /** Default "year". */
  timeStepUnit?: string;
  /** Id generator (default: random ids from newId); tests pass a deterministic one. */
  newId?: (prefix: IdPrefix) => string;
}

export interface AgeClassTemplateOptions extends TemplateOptions {
  /** Let the last class survive into itself (an "older than k−1" class). Default false. */
  lastClassStasis?: boolean;
}

const SPACING = 200;
const position = (i: number) => ({ x: 100 + SPACING * i, y: 160 });

function checkCount(k: number): void {
  if (!Number.isInteger(k) || k < 1 || k > MAX_STAGES) throw new RangeError(`The number of stages must be a whole number from 1 to ${MAX_STAGES}; got ${k}.`);
}

type Draft = Pick<LifeCycleInput, "stages" | "rates" | "transitions">;

function finish(draft: Draft, defaultName: string, options: TemplateOptions): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: options.name ?? defaultName,
    census: options.census ?? "pre-breeding",
    timeStepUnit: options.timeStepUnit ?? "year",
    ...draft,
  });
}

function fertilityNote(census: Census, x: string): string {
  return census === "pre-breeding"
    ? `Fertility of class ${x}: offspring counted at the next census per individual in class ${x}. Pre-breeding census: F = l(1)·m, first-year survival times fecundity.`
    : `Fertility of class ${x}: offspring counted just after breeding per individual in class ${x}. Post-breeding census: F = P·m, the parent's survival to breeding times its fecundity.`;
}

/**
 * A Leslie (age-classified) life cycle with k classes: survival P_x from
 * class x to x+1, reproduction F_x from every class into class 1, and
 * optionally stasis P_k in the last class. Every arrow's rate is a named
 * vital rate (value 0, to be filled in).
 */
export function ageClassTemplate(k: number, options: AgeClassTemplateOptions = {}): LifeCycle {
  checkCount(k);
  const id = options.newId ?? randomId;
  const census = options.census ?? "pre-breeding";
  const last = options.lastClassStasis === true;
  const stages = Array.from({ length: k }, (_, i) => ({
    id: id("st"),
    name: last && i === k - 1 ? `Age class ${k}+` : `Age class ${i + 1}`,
    position: position(i),
  }));
  const draft: Draft = { stages, rates: [], transitions: [] };
  const addArrow = (from: number, to: number, kind: "growth" | "stasis" | "reproduction", rateName: string, note: string) => {
    draft.rates.push({ id: id("vr"), name: rateName, value: 0, notes: note });
    draft.transitions.push({ id: id("tr"), from: stages[from]!.id, to: stages[to]!.id, kind, rate: rateName });
  };
  for (let x = 0; x < k; x++) {
    addArrow(x, 0, "reproduction", `F${x + 1}`, fertilityNote(census, String(x + 1)));
  }
  for (let x = 0; x + 1 < k; x++) {
    addArrow(x, x + 1, "growth", `P${x + 1}`, `Survival from age class ${x + 1} to age class ${x + 2}.`);
  }
  if (last) addArrow(k - 1, k - 1, "stasis", `P${k}`, `Survival of the last class, which stays in it.`);
  return finish(draft, `Age-classified life cycle (${k} classes)`, options);
}

/**
 * A stage-classified life cycle with k stages in a chain: stasis P_i in
 * every stage, growth G_i from stage i to i+1, and reproduction F_k from the
 * last stage into the first. Rates are named vital rates with value 0.
 */
export function stageTemplate(k: number, options: TemplateOptions = {}): LifeCycle {
  checkCount(k);
  const id = options.newId ?? randomId;
  const census = options.census ?? "pre-breeding";
  const stages = Array.from({ length: k }, (_, i) => ({ id: id("st"), name: `Stage ${i + 1}`, position: position(i) }));
  const draft: Draft = { stages, rates: [], transitions: [] };
  const addArrow = (from: number, to: number, kind: "growth" | "stasis" | "reproduction", rateName: string, note: string) => {
    draft.rates.push({ id: id("vr"), name: rateName, value: 0, notes: note });
    draft.transitions.push({ id: id("tr"), from: stages[from]!.id, to: stages[to]!.id, kind, rate: rateName });
  };
  for (let i = 0; i < k; i++) {
    addArrow(i, i, "stasis", `P${i + 1}`, `Probability of surviving and staying in stage ${i + 1}.`);
    if (i + 1 < k) addArrow(i, i + 1, "growth", `G${i + 1}`, `Probability of surviving and growing from stage ${i + 1} to stage ${i + 2}.`);
  }
  addArrow(k - 1, 0, "reproduction", `F${k}`, fertilityNote(census, String(k)));
  return finish(draft, `Stage-classified life cycle (${k} stages)`, options);
}

export interface FromMatrixOptions extends TemplateOptions {
  /**
   * The reproduction part F of the matrix (same size, 0 ≤ F_ij ≤ A_ij). Each
   * cell becomes a reproduction arrow for F_ij and a survival arrow for
   * A_ij − F_ij, each where it is > 0.
   */
  reproduction?: readonly (readonly number[])[];
  /** 0-based rows whose entries are all reproduction (e.g. [0] for a Leslie matrix). */
  reproductionRows?: readonly number[];
}

/**
 * A life cycle whose arrows reproduce a given matrix, with numeric rates:
 * one arrow per non-zero entry (two where a cell is part survival, part
 * reproduction). A matrix does not say which entries are reproduction, so
 * nothing is unless the caller says so through `reproduction` (an F matrix)
 * or `reproductionRows`. The other entries become stasis on the diagonal,
 * growth below it (to a later stage) and shrinkage above it (stages are
 * taken to be in order of development, as rows and columns).
 * Throws RangeError for a bad matrix or options, ZodError for a document
 * over the limits (e.g. more than MAX_TRANSITIONS arrows).
 */
export function lifeCycleFromMatrix(
  matrix: readonly (readonly number[])[],
  stageNames?: readonly string[],
  options: FromMatrixOptions = {},
): LifeCycle {
  const n = matrix.length;
  if (n < 1 || n > MAX_STAGES) throw new RangeError(`The matrix must have 1 to ${MAX_STAGES} rows; got ${n}.`);
  const checkSquare = (m: readonly (readonly number[])[], what: string) =>
    m.forEach((row, i) => {
      if (row.length !== n) throw new RangeError(`${what} row ${i + 1} has ${row.length} entries; the matrix is ${n}×${n}.`);
      row.forEach((v, j) => {
        if (!Number.isFinite(v) || v < 0) throw new RangeError(`${what} entry (${i + 1}, ${j + 1}) is ${v}; entries must be finite numbers ≥ 0.`);
      });
    });
  checkSquare(matrix, "Matrix");
  if (stageNames !== undefined && stageNames.length !== n) throw new RangeError(`Give ${n} stage names, one per row; got ${stageNames.length}.`);
  const { reproduction, reproductionRows } = options;
  if (reproduction !== undefined && reproductionRows !== undefined) {
    throw new RangeError("Say which entries are reproduction either with a reproduction matrix or with reproductionRows, not both.");
  }
  if (reproduction !== undefined) {
    if (reproduction.length !== n) throw new RangeError(`The reproduction matrix has ${reproduction.length} rows; the matrix has ${n}.`);
    checkSquare(reproduction, "Reproduction matrix");
  }
  const rowIsReproduction = new Array<boolean>(n).fill(false);
  for (const r of reproductionRows ?? []) {
    if (!Number.isInteger(r) || r < 0 || r >= n) throw new RangeError(`reproductionRows holds 0-based row numbers from 0 to ${n - 1}; got ${r}.`);
    rowIsReproduction[r] = true;
  }

  const id = options.newId ?? randomId;
  const stages = Array.from({ length: n }, (_, i) => ({ id: id("st"), name: stageNames?.[i] ?? `Stage ${i + 1}`, position: position(i) }));
  const transitions: LifeCycleInput["transitions"] = [];
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      const a = matrix[i]![j]!;
      let f = rowIsReproduction[i] ? a : (reproduction?.[i]?.[j] ?? 0);
      if (f > a) {
        if (f - a > 1e-12 * Math.max(1, a)) {
          throw new RangeError(`Reproduction entry (${i + 1}, ${j + 1}) is ${f} but the matrix entry is only ${a}: F is part of A.`);
        }
        f = a;
      }
      const u = a - f;
      const arrow = { from: stages[j]!.id, to: stages[i]!.id };
      if (u > 0) transitions.push({ id: id("tr"), ...arrow, kind: i === j ? "stasis" : i > j ? "growth" : "shrinkage", rate: u });
      if (f > 0) transitions.push({ id: id("tr"), ...arrow, kind: "reproduction", rate: f });
    }
  }
  return finish({ stages, rates: [], transitions }, "Imported matrix", options);
}
