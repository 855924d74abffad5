/**
 * From a life cycle and Risk settings to the numeric core's stochastic model.
 *
 * - "matrices" / "markov": the matrices of other life cycles of the Study
 *   (each evaluated at its own vital-rate values). They must have the same
 *   stages, by id, in the same order as the life cycle of the Run.
 * - "vital-rates": each year the chosen vital rates are drawn from their
 *   distributions (optionally correlated through a Gaussian copula, see
 *   distributions.ts), the other rates keep their document values, and the
 *   life cycle's formulas give A, U and F.
 *
 * Errors that need the documents (unknown ids, different stages, formulas
 * that fail) are RiskModelError: a 400 with the path of the settings field.
 */
import {
  analyzeMatrix,
  choleskyLower,
  SimulationError,
  type EnvironmentMatrices,
  type MatrixSampler,
  type SimulationSettings,
  type StochasticModel,
} from "../demography/index";
import { buildMatrices, compileLifeCycle, derivative, formulaRateNames, LifeCycleFormulaError, type LifeCycle, type ProjectionMatrices } from "../lifecycle/index";
import { correlationMatrix, type RiskSettings } from "../schemas/risk";
import { drawRate, normalScoreMap, rateLaw, type RateLaw } from "./distributions";

/** A settings problem found against the documents; `path` locates the field (as zod paths do). */
export class RiskModelError extends Error {
  override readonly name = "RiskModelError";
  /** HTTP status for the error translator: the request was wrong. */
  readonly status = 400;
  constructor(
    message: string,
    readonly path: readonly (string | number)[],
  ) {
    super(message);
  }
  /** As the API's field list: [{ path: "environment.lifeCycleIds.1", message }]. */
  get fields(): { path: string; message: string }[] {
    return [{ path: this.path.map(String).join(".") || "(body)", message: this.message }];
  }
}

/** Everything a Run needs besides the seed and the chunk plan. */
export interface RiskModel {
  readonly model: StochasticModel;
  readonly simulation: SimulationSettings;
  readonly stageIds: string[];
  readonly stageNames: string[];
  /** The life cycle's projection interval ("year" unless the document says otherwise). */
  readonly timeStepUnit: string;
  /** Expected matrices: weighted (or stationary-weighted) means of the sets, or the formulas at the rates' means. */
  readonly meanMatrices: ProjectionMatrices;
  /** Mean age of parents T̄ of the mean matrices (projection intervals): the IUCN generation length. */
  readonly generationLength: number | null;
  readonly generationLengthReason: string | null;
}

/**
 * Build the core's model and settings for a Risk run of `doc`. `otherDocs`
 * maps life-cycle ids to documents of the same Study (include `doc` under
 * its own id when it is one of the environments).
 */
export function buildRiskModel(
  doc: LifeCycle,
  settings: RiskSettings,
  otherDocs: Readonly<Record<string, LifeCycle>> | ReadonlyMap<string, LifeCycle> = {},
): RiskModel {
  const stageIds = doc.stages.map((s) => s.id);
  const stageNames = doc.stages.map((s) => s.name);
  const n = stageIds.length;
  if (n === 0) throw new RiskModelError("This life cycle has no stages to simulate.", []);
  if (settings.initial.length !== n) {
    throw new RiskModelError(`Give one initial abundance per stage: the life cycle has ${n} stages (${stageNames.join(", ")}), the settings give ${settings.initial.length}.`, ["initial"]);
  }
  const stageIndex = new Map(stageIds.map((id, i) => [id, i]));
  let thresholdStages: number[] | null = null;
  if (settings.threshold.stages !== undefined) {
    thresholdStages = settings.threshold.stages.map((id, k) => {
      const i = stageIndex.get(id);
      if (i === undefined) throw new RiskModelError(`No stage of this life cycle has the id "${id}".`, ["threshold", "stages", k]);
      return i;
    });
    const sub = thresholdStages.reduce((s, i) => s + settings.initial[i]!, 0);
    if (sub <= settings.threshold.value) {
      throw new RiskModelError(`The chosen stages start with ${sub} individuals, already at or below the threshold (${settings.threshold.value}).`, ["threshold", "value"]);
    }
  }

  const env = settings.environment;
  let model: StochasticModel;
  let mean: ProjectionMatrices;
  if (env.kind === "matrices" || env.kind === "markov") {
    const lookup = (id: string): LifeCycle | undefined => (otherDocs instanceof Map ? otherDocs.get(id) : (otherDocs as Readonly<Record<string, LifeCycle>>)[id]);
    const sets: (EnvironmentMatrices & ProjectionMatrices)[] = env.lifeCycleIds.map((id, k) => {
      const path = ["environment", "lifeCycleIds", k];
      const other = lookup(id);
      if (other === undefined) throw new RiskModelError(`The life cycle "${id}" was not found in this Study.`, path);
      checkSameStages(doc, other, id, path);
      const m = buildMatrices(other);
      if (m.errors.length > 0) {
        throw new RiskModelError(`The life cycle "${other.name}" (${id}) has rates that cannot be computed: ${m.errors.map((e) => e.message).join("; ")}`, path);
      }
      return { A: m.A, U: m.U, F: m.F };
    });
    if (settings.demographic) checkSurvivalColumns(sets, env.lifeCycleIds, stageNames);
    if (env.kind === "matrices") {
      model = { kind: "independent", matrices: sets, weights: env.weights };
      mean = weightedMean(sets, env.weights, n);
    } else {
      const initial = env.lifeCycleIds.map((id) => (id === env.initialState ? 1 : 0));
      model = { kind: "markov", matrices: sets, transition: env.transition, initial };
      mean = weightedMean(sets, stationary(env.transition), n);
    }
  } else {
    const built = vitalRateSampler(doc, env, settings.demographic);
    model = built.model;
    mean = built.mean;
  }

  const simulation: SimulationSettings = {
    horizon: settings.horizon,
    replicates: settings.replicates,
    initial: settings.initial,
    demographic: settings.demographic,
    ceiling: settings.ceiling ?? null,
    threshold: { value: settings.threshold.value, stages: thresholdStages },
    ...(settings.horizons ? { reportYears: settings.horizons } : {}),
    ...(settings.burnIn !== undefined ? { burnIn: settings.burnIn } : {}),
  };

  let generationLength: number | null = null;
  let generationLengthReason: string | null = null;
  try {
    const a = analyzeMatrix({ A: mean.A, U: mean.U, F: mean.F });
    generationLength = a.lifeHistory?.meanAgeOfParents ?? null;
    if (generationLength === null) {
      generationLengthReason = a.lifeHistory?.nullReasons.meanAgeOfParents ?? a.nullReasons.lifeHistory ?? "The mean age of parents is not defined for the mean matrices.";
    }
  } catch (err) {
    generationLengthReason = `The mean matrices could not be analysed: ${(err as Error).message}`;
  }

  return { model, simulation, stageIds, stageNames, timeStepUnit: doc.timeStepUnit, meanMatrices: mean, generationLength, generationLengthReason };
}

function checkSameStages(doc: LifeCycle, other: LifeCycle, id: string, path: (string | number)[]): void {
  const a = doc.stages.map((s) => s.id);
  const b = other.stages.map((s) => s.id);
  if (a.length !== b.length) {
    throw new RiskModelError(
      `The life cycle "${other.name}" (${id}) has ${b.length} stages but "${doc.name}" has ${a.length}: the matrices of one Risk run must have the same stages in the same order.`,
      path,
    );
  }
  const k = a.findIndex((s, i) => s !== b[i]);
  if (k >= 0) {
    const named = (d: LifeCycle, i: number) => `"${d.stages[i]!.name}" (${d.stages[i]!.id})`;
    const elsewhere = b.indexOf(a[k]!);
    throw new RiskModelError(
      `Stage ${k + 1} of "${other.name}" (${id}) is ${named(other, k)} but stage ${k + 1} of "${doc.name}" is ${named(doc, k)}${elsewhere >= 0 ? ` (it is stage ${elsewhere + 1} there)` : ""}: the matrices of one Risk run must have the same stages, by id, in the same order. Duplicate the life cycle to make a variant with the same stages.`,
      path,
    );
  }
}

function checkSurvivalColumns(sets: readonly ProjectionMatrices[], ids: readonly string[], stageNames: readonly string[]): void {
  sets.forEach((m, k) => {
    const n = m.U.length;
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += m.U[i]![j]!;
      if (s > 1 + 1e-9) {
        throw new RiskModelError(
          `In life cycle ${ids[k]}, survival out of "${stageNames[j]}" sums to ${s.toPrecision(4)} > 1; demographic stochasticity needs every stage's survival and growth to sum to at most 1.`,
          ["environment", "lifeCycleIds", k],
        );
      }
    }
  });
}

function weightedMean(sets: readonly ProjectionMatrices[], weights: readonly number[], n: number): ProjectionMatrices {
  const zero = () => Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const out = { A: zero(), U: zero(), F: zero() };
  sets.forEach((m, k) => {
    const w = weights[k]!;
    for (const key of ["A", "U", "F"] as const) {
      for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) out[key][i]![j]! += w * m[key][i]![j]!;
    }
  });
  return out;
}

/** Stationary distribution of a row-stochastic matrix (power iteration on ½(I + P)). */
function stationary(P: readonly (readonly number[])[]): number[] {
  const K = P.length;
  let pi = new Array<number>(K).fill(1 / K);
  for (let it = 0; it < 100_000; it++) {
    const next = pi.map((p) => 0.5 * p);
    for (let i = 0; i < K; i++) for (let j = 0; j < K; j++) next[j]! += 0.5 * pi[i]! * P[i]![j]!;
    const diff = next.reduce((s, v, i) => s + Math.abs(v - pi[i]!), 0);
    pi = next;
    if (diff < 1e-14) break;
  }
  return pi;
}

type VitalRateEnvironment = Extract<RiskSettings["environment"], { kind: "vital-rates" }>;

function vitalRateSampler(doc: LifeCycle, env: VitalRateEnvironment, demographic: boolean): { model: StochasticModel; mean: ProjectionMatrices } {
  let compiled: ReturnType<typeof compileLifeCycle>;
  try {
    compiled = compileLifeCycle(doc);
  } catch (err) {
    if (err instanceof LifeCycleFormulaError) throw new RiskModelError(`The life cycle's formulas cannot be computed: ${err.message}`, []);
    throw err;
  }
  const n = doc.stages.length;
  const slotOf = new Map(compiled.rateIds.map((id, i) => [id, i]));
  const laws: RateLaw[] = env.rates.map((r, i) => {
    if (!slotOf.has(r.rateId)) {
      const byName = doc.rates.find((x) => x.name === r.rateId);
      throw new RiskModelError(`No vital rate of this life cycle has the id "${r.rateId}"${byName ? ` ("${r.rateId}" is a rate name; use its id "${byName.id}")` : ""}.`, ["environment", "rates", i, "rateId"]);
    }
    try {
      return rateLaw(r.distribution, r.mean, r.sd);
    } catch (err) {
      throw new RiskModelError((err as Error).message, ["environment", "rates", i, "sd"]);
    }
  });
  const slots = env.rates.map((r) => slotOf.get(r.rateId)!);

  // Rates in some correlation go through the copula; the others are drawn directly.
  const correlations = (env.correlations ?? []).filter((c) => c.r !== 0);
  const inCopula = new Set<number>();
  const index = new Map(env.rates.map((r, i) => [r.rateId, i]));
  for (const c of correlations) {
    inCopula.add(index.get(c.a)!);
    inCopula.add(index.get(c.b)!);
  }
  const copula = [...inCopula].sort((a, b) => a - b);
  const direct = env.rates.map((_, i) => i).filter((i) => !inCopula.has(i));
  let L: Float64Array = new Float64Array(0);
  if (copula.length > 0) {
    const full = correlationMatrix(env.rates.length, correlations, index);
    const sub = copula.map((i) => copula.map((j) => full[i]![j]!));
    const chol = choleskyLower(sub);
    if (!chol.ok) {
      throw new RiskModelError(
        `The correlations are not mutually consistent: the correlation matrix is not positive definite (the check fails at "${env.rates[copula[chol.row]!]!.rateId}"). Weaken correlations of ±1 or strong correlations with incompatible signs.`,
        ["environment", "correlations"],
      );
    }
    L = chol.L;
  }
  const m = copula.length;
  const maps = copula.map((i) => normalScoreMap(laws[i]!));
  const copulaSlots = Int32Array.from(copula, (i) => slots[i]!);
  const directLaws = direct.map((i) => laws[i]!);
  const directSlots = Int32Array.from(direct, (i) => slots[i]!);

  // Where each arrow lands in the matrices.
  const entries = buildMatrices(doc).entries;
  const cellOf = Int32Array.from(entries, (e) => e.row * n + e.col);
  const isReproduction = Uint8Array.from(entries, (e) => (e.kind === "reproduction" ? 1 : 0));
  const cells: [number, number][] = [];
  const seen = new Set<number>();
  for (const e of entries) {
    const c = e.row * n + e.col;
    if (!seen.has(c)) {
      seen.add(c);
      cells.push([e.row, e.col]);
    }
  }
  const values = Float64Array.from(compiled.baseValues);
  const eps = new Float64Array(m);
  const rateNames = compiled.rateNames;

  const sample: MatrixSampler = (rng, out) => {
    for (let i = 0; i < m; i++) eps[i] = rng.normal();
    for (let i = 0; i < m; i++) {
      let z = 0;
      for (let k = 0; k <= i; k++) z += L[i * m + k]! * eps[k]!;
      values[copulaSlots[i]!] = maps[i]!(z);
    }
    for (let i = 0; i < directLaws.length; i++) values[directSlots[i]!] = drawRate(directLaws[i]!, rng);
    let tv: Float64Array;
    try {
      tv = compiled.transitionValues(values);
    } catch (err) {
      if (err instanceof LifeCycleFormulaError) {
        const drawn = env.rates.map((r) => `${rateNames[slotOf.get(r.rateId)!]} = ${values[slotOf.get(r.rateId)!]!.toPrecision(4)}`).join(", ");
        throw new SimulationError(`With the drawn vital rates (${drawn}) an arrow's rate cannot be computed: ${err.message}. Narrow the distributions or change the formula.`);
      }
      throw err;
    }
    for (let e = 0; e < cellOf.length; e++) {
      const c = cellOf[e]!;
      out.A[c] = 0;
      out.U[c] = 0;
      out.F[c] = 0;
    }
    for (let e = 0; e < cellOf.length; e++) {
      const c = cellOf[e]!;
      const v = tv[e]!;
      out.A[c] = out.A[c]! + v;
      if (isReproduction[e]) out.F[c] = out.F[c]! + v;
      else out.U[c] = out.U[c]! + v;
    }
  };

  // Mean matrices: the formulas at the rates' means (exact when the formulas are linear in the drawn rates).
  const meanValues = Float64Array.from(compiled.baseValues);
  env.rates.forEach((r, i) => (meanValues[slots[i]!] = r.mean));
  let mean: ProjectionMatrices;
  try {
    mean = compiled.evaluate(meanValues);
  } catch (err) {
    if (err instanceof LifeCycleFormulaError) throw new RiskModelError(`At the rates' means an arrow's rate cannot be computed: ${err.message}`, ["environment", "rates"]);
    throw err;
  }
  if (demographic) {
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += mean.U[i]![j]!;
      if (s > 1 + 1e-9) {
        throw new RiskModelError(
          `At the rates' means, survival out of "${doc.stages[j]!.name}" sums to ${s.toPrecision(4)} > 1; demographic stochasticity needs every stage's survival and growth to sum to at most 1.`,
          ["demographic"],
        );
      }
    }
  }
  const exact = meanIsExact(doc, env.rates.map((r) => rateNames[slotOf.get(r.rateId)!]!), correlations.map((c) => [rateNames[slotOf.get(c.a)!]!, rateNames[slotOf.get(c.b)!]!] as const));
  return { model: { kind: "sampler", stageCount: n, sample, cells, meanMatrix: mean.A, meanMatrixExact: exact }, mean };
}

/**
 * E[A] equals A at the rates' means when every formula is affine in each
 * drawn rate (zero second derivative) and correlated rates never multiply
 * (zero mixed derivative): products of independent rates have the product
 * of their means as expectation.
 */
function meanIsExact(doc: LifeCycle, drawn: readonly string[], correlated: readonly (readonly [string, string])[]): boolean {
  const isZero = (formula: string, a: string, b: string): boolean => {
    try {
      return derivative(derivative(formula, a).formula, b).formula.trim() === "0";
    } catch {
      return false;
    }
  };
  const drawnSet = new Set(drawn);
  for (const t of doc.transitions) {
    if (typeof t.rate !== "string") continue;
    const used = new Set(formulaRateNames(t.rate).filter((r) => drawnSet.has(r)));
    for (const r of used) if (!isZero(t.rate, r, r)) return false;
    for (const [a, b] of correlated) if (used.has(a) && used.has(b) && !isZero(t.rate, a, b)) return false;
  }
  return true;
}
