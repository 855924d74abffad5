/**
 * Projection matrices from a life-cycle document, and sensitivities of λ to
 * the named vital rates.
 *
 * Convention (METHODS.md §0): an arrow from stage j to stage i is a_ij,
 * row i, column j. Reproduction arrows form F; growth, stasis and shrinkage
 * form U; A = U + F. Two arrows may share a cell (e.g. growth and
 * reproduction from j to i); their rates add up.
 */
import {
  bindExpr,
  checkFormula,
  derivativeTree,
  FormulaEvaluationError,
  type BoundFormula,
  type Expr,
  type FormulaError,
} from "./formula";
import type { LifeCycle, TransitionKind } from "./schema";

/** A formula problem tied to the arrow whose rate it is. */
export interface TransitionFormulaError extends FormulaError {
  transitionId: string;
}

/** Thrown by a compiled life cycle when a rate cannot be computed. */
export class LifeCycleFormulaError extends Error {
  override readonly name = "LifeCycleFormulaError";
  constructor(readonly errors: readonly TransitionFormulaError[]) {
    super(errors.map((e) => `${e.transitionId}: ${e.message}`).join("\n"));
  }
}

/**
 * Vital-rate values: either a Float64Array with one value per rate in the
 * order of `doc.rates`, or an object of overrides keyed by rate **id**
 * (rates not named keep their document value).
 */
export type RateValues = Float64Array | Readonly<Record<string, number>>;

export interface ProjectionMatrices {
  /** A = U + F, row = stage at t+1, column = stage at t. */
  A: number[][];
  /** Growth, stasis and shrinkage. */
  U: number[][];
  /** Reproduction. */
  F: number[][];
}

/** One arrow's place and value in the matrices. */
export interface MatrixEntry {
  transitionId: string;
  kind: TransitionKind;
  /** Index of the `to` stage. */
  row: number;
  /** Index of the `from` stage. */
  col: number;
  /** The arrow's rate; NaN when it cannot be computed (see `error`). */
  value: number;
  error?: TransitionFormulaError;
}

export interface LifeCycleMatrices extends ProjectionMatrices {
  stageIds: string[];
  stageNames: string[];
  /** One per arrow, in document order. */
  entries: MatrixEntry[];
  /**
   * Every arrow whose rate could not be computed or is negative. The cells
   * of such arrows are NaN in A, U and F: check `errors` before analysing.
   */
  errors: TransitionFormulaError[];
}

export interface VitalRateSensitivity {
  rateId: string;
  name: string;
  /** The value the derivatives were taken at. */
  value: number;
  /** ∂λ/∂x = Σ_ij s_ij ∂a_ij/∂x (per unit of the rate). */
  sensitivity: number;
  /** (x/λ) ∂λ/∂x; these do not sum to 1 (METHODS.md §2). */
  elasticity: number;
  /** Set when a derivative could not be evaluated; sensitivity and elasticity are then NaN. */
  error?: TransitionFormulaError;
}

/** A life cycle compiled once, evaluated many times (scenarios, finite differences, Monte Carlo). */
export interface CompiledLifeCycle {
  readonly stageIds: readonly string[];
  readonly stageNames: readonly string[];
  readonly rateIds: readonly string[];
  readonly rateNames: readonly string[];
  /** The document's vital-rate values, in `rateIds` order (shared: do not modify). */
  readonly baseValues: Float64Array;
  /** Full vector of values: document values with overrides (by rate id) applied. */
  values(overrides?: Readonly<Record<string, number>>): Float64Array;
  /** Each arrow's rate in document order. Throws LifeCycleFormulaError. */
  transitionValues(values?: RateValues): Float64Array;
  /** A, U and F at the given values. Throws LifeCycleFormulaError. */
  evaluate(values?: RateValues): ProjectionMatrices;
  /** Vital-rate sensitivities and elasticities given the sensitivity matrix S of A and its λ. */
  vitalRateSensitivities(S: readonly (readonly number[])[], lambda: number, values?: RateValues): VitalRateSensitivity[];
}

interface CompiledTransition {
  readonly id: string;
  readonly kind: TransitionKind;
  readonly row: number;
  readonly col: number;
  readonly formula: string | null;
  readonly expr: Expr | null;
  readonly constant: number;
  readonly fn: BoundFormula | null;
  /** Slots of the rates the formula uses. */
  readonly rateSlots: readonly number[];
}

interface Compilation {
  readonly stageIds: string[];
  readonly stageNames: string[];
  readonly rateIds: string[];
  readonly rateNames: string[];
  readonly baseValues: Float64Array;
  readonly idToSlot: ReadonlyMap<string, number>;
  readonly nameToSlot: ReadonlyMap<string, number>;
  readonly transitions: readonly CompiledTransition[];
  /** Compile-time problems, by transition index. */
  readonly problems: ReadonlyMap<number, TransitionFormulaError>;
}

function compileTransitions(doc: LifeCycle): Compilation {
  const stageIds = doc.stages.map((s) => s.id);
  const stageNames = doc.stages.map((s) => s.name);
  const stageIndex = new Map(stageIds.map((id, i) => [id, i]));
  const rateIds = doc.rates.map((r) => r.id);
  const rateNames = doc.rates.map((r) => r.name);
  const idToSlot = new Map<string, number>();
  const nameToSlot = new Map<string, number>();
  doc.rates.forEach((r, i) => {
    if (idToSlot.has(r.id) || nameToSlot.has(r.name)) {
      throw new Error(`Vital rate ids and names must be unique ("${r.id}", "${r.name}"); parse the document with LifeCycleSchema first.`);
    }
    idToSlot.set(r.id, i);
    nameToSlot.set(r.name, i);
  });
  const baseValues = Float64Array.from(doc.rates, (r) => r.value);
  const problems = new Map<number, TransitionFormulaError>();
  const transitions = doc.transitions.map((t, i): CompiledTransition => {
    const row = stageIndex.get(t.to);
    const col = stageIndex.get(t.from);
    if (row === undefined || col === undefined) {
      throw new Error(`Arrow "${t.id}" refers to a stage that does not exist; parse the document with LifeCycleSchema first.`);
    }
    const base = { id: t.id, kind: t.kind, row, col };
    if (typeof t.rate === "number") {
      if (!Number.isFinite(t.rate) || t.rate < 0) {
        problems.set(i, {
          transitionId: t.id,
          code: t.rate < 0 ? "negative" : "not-finite",
          formula: String(t.rate),
          message: `The rate ${t.rate} is not a finite number ≥ 0.`,
        });
      }
      return { ...base, formula: null, expr: null, constant: t.rate, fn: null, rateSlots: [] };
    }
    const check = checkFormula(t.rate, nameToSlot.keys());
    if (!check.ok) {
      problems.set(i, { ...check.errors[0]!, transitionId: t.id });
      return { ...base, formula: t.rate, expr: null, constant: NaN, fn: null, rateSlots: [] };
    }
    const { compiled } = check;
    const slot = (name: string) => nameToSlot.get(name)!;
    return {
      ...base,
      formula: t.rate,
      expr: compiled.expr,
      constant: NaN,
      fn: bindExpr(compiled.expr, slot, t.rate),
      rateSlots: compiled.rateNames.map(slot),
    };
  });
  return { stageIds, stageNames, rateIds, rateNames, baseValues, idToSlot, nameToSlot, transitions, problems };
}

function resolveValues(c: Compilation, values: RateValues | undefined): Float64Array {
  const n = c.rateIds.length;
  if (values === undefined) return c.baseValues;
  if (values instanceof Float64Array) {
    if (values.length !== n) throw new RangeError(`Expected ${n} vital-rate values (one per rate, in document order); got ${values.length}.`);
    for (let i = 0; i < n; i++) {
      if (!Number.isFinite(values[i])) throw new RangeError(`The value of vital rate ${c.rateNames[i]} must be a finite number; got ${values[i]}.`);
    }
    return values;
  }
  const x = Float64Array.from(c.baseValues);
  for (const [id, v] of Object.entries(values)) {
    const slot = c.idToSlot.get(id);
    if (slot === undefined) {
      const byName = c.nameToSlot.get(id);
      const hint = byName === undefined ? "" : ` ("${id}" is a rate name; values are keyed by rate id, here "${c.rateIds[byName]}")`;
      throw new RangeError(`No vital rate has the id "${id}"${hint}.`);
    }
    if (typeof v !== "number" || !Number.isFinite(v)) throw new RangeError(`The value of vital rate ${c.rateNames[slot]} must be a finite number; got ${String(v)}.`);
    x[slot] = v;
  }
  return x;
}

/** Value of one arrow, or the reason it has none. */
function transitionValue(t: CompiledTransition, x: Float64Array): { value: number; error?: TransitionFormulaError } {
  if (t.fn === null) return { value: t.constant };
  let value: number;
  try {
    value = t.fn(x);
  } catch (err) {
    if (err instanceof FormulaEvaluationError) return { value: NaN, error: { ...err.detail, transitionId: t.id } };
    throw err;
  }
  if (value < 0) {
    return {
      value,
      error: {
        transitionId: t.id,
        code: "negative",
        formula: t.formula ?? String(value),
        message: `The rate ${t.formula} is ${value} at these vital-rate values; a matrix entry cannot be negative.`,
      },
    };
  }
  return { value };
}

const zeros = (n: number): number[][] => Array.from({ length: n }, () => new Array<number>(n).fill(0));

function checkSensitivityInput(n: number, S: readonly (readonly number[])[], lambda: number): void {
  if (!Number.isFinite(lambda) || lambda <= 0) throw new RangeError(`λ must be a positive finite number; got ${lambda}.`);
  if (S.length !== n || S.some((row) => row.length !== n)) throw new RangeError(`The sensitivity matrix must be ${n}×${n}, one row and column per stage.`);
  if (S.some((row) => row.some((v) => !Number.isFinite(v)))) throw new RangeError("The sensitivity matrix must contain finite numbers only.");
}

/**
 * Compiles every arrow's formula once; the result evaluates A, U and F (or
 * vital-rate sensitivities) for any vital-rate values cheaply. Throws
 * LifeCycleFormulaError when a formula does not compile (never for a
 * document that passed LifeCycleSchema).
 */
export function compileLifeCycle(doc: LifeCycle): CompiledLifeCycle {
  const c = compileTransitions(doc);
  if (c.problems.size > 0) throw new LifeCycleFormulaError([...c.problems.values()]);
  const n = c.stageIds.length;
  const derivatives = new Map<string, BoundFormula>();
  const derivativeOf = (t: CompiledTransition, slot: number): BoundFormula => {
    const key = `${t.id}\u0000${slot}`;
    let fn = derivatives.get(key);
    if (fn === undefined) {
      const formula = t.formula!;
      fn = bindExpr(derivativeTree(formula, c.rateNames[slot]!), (name) => c.nameToSlot.get(name)!, formula);
      derivatives.set(key, fn);
    }
    return fn;
  };
  const valueOrThrow = (t: CompiledTransition, x: Float64Array): number => {
    const r = transitionValue(t, x);
    if (r.error) throw new LifeCycleFormulaError([r.error]);
    return r.value;
  };

  return {
    stageIds: c.stageIds,
    stageNames: c.stageNames,
    rateIds: c.rateIds,
    rateNames: c.rateNames,
    baseValues: c.baseValues,
    values: (overrides) => Float64Array.from(resolveValues(c, overrides)),
    transitionValues(values) {
      const x = resolveValues(c, values);
      return Float64Array.from(c.transitions, (t) => valueOrThrow(t, x));
    },
    evaluate(values) {
      const x = resolveValues(c, values);
      const A = zeros(n);
      const U = zeros(n);
      const F = zeros(n);
      for (const t of c.transitions) {
        const v = valueOrThrow(t, x);
        A[t.row]![t.col]! += v;
        (t.kind === "reproduction" ? F : U)[t.row]![t.col]! += v;
      }
      return { A, U, F };
    },
    vitalRateSensitivities(S, lambda, values) {
      checkSensitivityInput(n, S, lambda);
      const x = resolveValues(c, values);
      const sens = new Float64Array(c.rateIds.length);
      const errors = new Map<number, TransitionFormulaError>();
      for (const t of c.transitions) {
        if (t.formula === null) continue; // a number does not depend on any vital rate
        const s = S[t.row]![t.col]!;
        for (const slot of t.rateSlots) {
          if (errors.has(slot)) continue;
          try {
            sens[slot]! += s * derivativeOf(t, slot)(x);
          } catch (err) {
            if (!(err instanceof FormulaEvaluationError)) throw err;
            errors.set(slot, {
              ...err.detail,
              transitionId: t.id,
              message: `The derivative of ${t.formula} with respect to ${c.rateNames[slot]} cannot be evaluated here: ${err.detail.message}`,
            });
          }
        }
      }
      return c.rateIds.map((rateId, i) => {
        const value = x[i]!;
        const error = errors.get(i);
        const sensitivity = error ? NaN : sens[i]!;
        return {
          rateId,
          name: c.rateNames[i]!,
          value,
          sensitivity,
          elasticity: error ? NaN : value === 0 ? 0 : (value / lambda) * sensitivity,
          ...(error ? { error } : {}),
        };
      });
    },
  };
}

/**
 * A, U and F of a life cycle, and each arrow's entry. Arrows whose rate
 * cannot be computed are listed in `errors` and make their cells NaN.
 * `rateValues` overrides vital-rate values (see RateValues).
 */
export function buildMatrices(doc: LifeCycle, rateValues?: RateValues): LifeCycleMatrices {
  const c = compileTransitions(doc);
  const x = resolveValues(c, rateValues);
  const n = c.stageIds.length;
  const A = zeros(n);
  const U = zeros(n);
  const F = zeros(n);
  const entries: MatrixEntry[] = [];
  const errors: TransitionFormulaError[] = [];
  c.transitions.forEach((t, i) => {
    const problem = c.problems.get(i);
    const r = problem ? { value: NaN, error: problem } : transitionValue(t, x);
    entries.push({ transitionId: t.id, kind: t.kind, row: t.row, col: t.col, value: r.value, ...(r.error ? { error: r.error } : {}) });
    if (r.error) errors.push(r.error);
    const v = r.error ? NaN : r.value;
    A[t.row]![t.col]! += v;
    (t.kind === "reproduction" ? F : U)[t.row]![t.col]! += v;
  });
  return { stageIds: c.stageIds, stageNames: c.stageNames, A, U, F, entries, errors };
}

/**
 * Sensitivity and elasticity of λ to each named vital rate:
 * ∂λ/∂x = Σ_ij s_ij ∂a_ij/∂x with s_ij from `S` (the sensitivity matrix of A,
 * computed by the caller at the same vital-rate values) and ∂a_ij/∂x from
 * each formula's symbolic derivative; elasticity (x/λ) ∂λ/∂x.
 */
export function vitalRateSensitivities(
  doc: LifeCycle,
  S: readonly (readonly number[])[],
  lambda: number,
  rateValues?: RateValues,
): VitalRateSensitivity[] {
  return compileLifeCycle(doc).vitalRateSensitivities(S, lambda, rateValues);
}
