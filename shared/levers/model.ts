/**
 * A life cycle prepared for lever work: compiled once, with its baseline
 * matrix, λ, w, sensitivities, and one "lever" per vital rate and per
 * non-zero matrix entry, each able to fill the matrix at a new value of
 * itself (everything else at baseline) on a Float64Array.
 */
import { analyzeMatrix, type MatrixAnalysis } from "../demography";
import { compileLifeCycle, LifeCycleFormulaError, rateScale, scaleBounds, type CompiledLifeCycle, type LifeCycle, type RateScale, type VitalRateSensitivity } from "../lifecycle";

/** Why a life cycle cannot be used for levers: a plain message and the field at fault. */
export class LeverError extends Error {
  override readonly name = "LeverError";
  constructor(
    message: string,
    readonly path: (string | number)[] = [],
  ) {
    super(message);
  }
}

export interface RateLever {
  readonly kind: "rate";
  readonly key: string;
  readonly rateId: string;
  readonly label: string;
  readonly slot: number;
  readonly value: number;
  readonly scale: RateScale;
  readonly lower: number;
  readonly upper: number;
  /** Arrows whose formula uses the rate. */
  readonly arrows: number;
}

export interface EntryLever {
  readonly kind: "entry";
  readonly key: string;
  /** Stage ids: a_ij with i = to (row), j = from (column). */
  readonly from: string;
  readonly to: string;
  readonly row: number;
  readonly col: number;
  readonly label: string;
  readonly value: number;
  /** true when every arrow in the cell is reproduction. */
  readonly reproduction: boolean;
  readonly lower: number;
  readonly upper: number;
  /** Why `upper` is what it is, in words. */
  readonly upperReason: string | null;
}

export type Lever = RateLever | EntryLever;

export interface LeverModel {
  readonly doc: LifeCycle;
  readonly n: number;
  readonly compiled: CompiledLifeCycle;
  readonly analysis: MatrixAnalysis;
  readonly lambda: number;
  /** Baseline A, row-major. */
  readonly a: Float64Array;
  /** Baseline w (Σ = 1). */
  readonly w: Float64Array;
  readonly vitalRates: VitalRateSensitivity[];
  readonly rates: RateLever[];
  readonly entries: EntryLever[];
  /** Fill `out` with A when rate `slot` takes value x (others at baseline); false when a formula fails there. */
  rateMatrixAt(slot: number, x: number, out: Float64Array): boolean;
  /** Fill `out` with A when entry (row, col) takes value x. */
  entryMatrixAt(row: number, col: number, x: number, out: Float64Array): boolean;
  /** A at a full vector of rate values (null when a formula fails). */
  matrixAtValues(values: Float64Array, out: Float64Array): boolean;
}

export const entryKey = (from: string, to: string) => `${from}>${to}`;

/** Prepares a life cycle for lever work; throws LeverError when it cannot be analysed or λ has no derivatives. */
export function leverModel(doc: LifeCycle): LeverModel {
  const n = doc.stages.length;
  if (n === 0) throw new LeverError("The life cycle has no stages yet: add stages and arrows first.", ["stages"]);
  let compiled: CompiledLifeCycle;
  let matrices: ReturnType<CompiledLifeCycle["evaluate"]>;
  try {
    compiled = compileLifeCycle(doc);
    matrices = compiled.evaluate();
  } catch (err) {
    if (err instanceof LifeCycleFormulaError) {
      const first = err.errors[0]!;
      const index = doc.transitions.findIndex((t) => t.id === first.transitionId);
      throw new LeverError(`The life cycle cannot be analysed: ${first.message}`, ["transitions", index, "rate"]);
    }
    throw err;
  }
  const analysis = analyzeMatrix({ A: matrices.A, U: matrices.U, F: matrices.F, stageNames: compiled.stageNames });
  if (analysis.sensitivity === null || analysis.stableStage === null || !(analysis.lambda > 0)) {
    throw new LeverError(`Levers need λ and its sensitivities, which this life cycle does not have: ${analysis.nullReasons.sensitivity ?? analysis.nullReasons.stableStage ?? "λ = 0."}`);
  }
  const a = new Float64Array(n * n);
  matrices.A.forEach((row, i) => row.forEach((v, j) => (a[i * n + j] = v)));
  const w = Float64Array.from(analysis.stableStage);
  const vitalRates = compiled.vitalRateSensitivities(analysis.sensitivity, analysis.lambda);

  const stageIndex = new Map(doc.stages.map((s, i) => [s.id, i]));
  const cellOf = doc.transitions.map((t) => stageIndex.get(t.to)! * n + stageIndex.get(t.from)!);
  const usesRate = doc.rates.map(() => 0);
  const slotOf = new Map(doc.rates.map((r, i) => [r.name, i]));
  for (const t of doc.transitions) {
    if (typeof t.rate !== "string") continue;
    const seen = new Set<number>();
    for (const m of t.rate.matchAll(/[A-Za-z_][A-Za-z0-9_]*/g)) {
      const slot = slotOf.get(m[0]);
      if (slot !== undefined && !seen.has(slot)) {
        seen.add(slot);
        usesRate[slot]! += 1;
      }
    }
  }
  const rates: RateLever[] = doc.rates.map((r, slot) => {
    const scale = rateScale(r);
    return { kind: "rate", key: r.id, rateId: r.id, label: r.name, slot, value: r.value, scale, ...scaleBounds(scale), arrows: usesRate[slot]! };
  });

  // One entry lever per non-zero cell. A survival/growth cell stays a
  // probability, and the survival out of its stage (U's column sum) ≤ 1.
  const reproductionOnly = new Map<number, boolean>();
  doc.transitions.forEach((t, k) => {
    const cell = cellOf[k]!;
    reproductionOnly.set(cell, (reproductionOnly.get(cell) ?? true) && t.kind === "reproduction");
  });
  const colSumU = new Float64Array(n);
  matrices.U.forEach((row) => row.forEach((v, j) => (colSumU[j]! += v)));
  const entries: EntryLever[] = [];
  for (const [cell, reproduction] of [...reproductionOnly.entries()].sort((p, q) => p[0] - q[0])) {
    const value = a[cell]!;
    if (!(value > 0)) continue;
    const row = Math.floor(cell / n);
    const col = cell % n;
    const from = doc.stages[col]!;
    const to = doc.stages[row]!;
    let upper = Infinity;
    let upperReason: string | null = null;
    if (!reproduction) {
      const u = matrices.U[row]![col]!;
      const room = 1 - (colSumU[col]! - u);
      if (colSumU[col]! <= 1 && room < 1) {
        upper = Math.max(room + (value - u), value);
        upperReason = `survival out of ${from.name} cannot exceed 1`;
      } else {
        upper = Math.max(1 + (value - u), value);
        upperReason = "a survival or growth entry is a probability";
      }
    }
    entries.push({
      kind: "entry",
      key: entryKey(from.id, to.id),
      from: from.id,
      to: to.id,
      row,
      col,
      label: `${from.name} → ${to.name}`,
      value,
      reproduction,
      lower: 0,
      upper,
      upperReason,
    });
  }

  const fill = (tv: Float64Array, out: Float64Array) => {
    out.fill(0);
    for (let k = 0; k < cellOf.length; k++) out[cellOf[k]!]! += tv[k]!;
  };
  const matrixAtValues = (values: Float64Array, out: Float64Array): boolean => {
    let tv: Float64Array;
    try {
      tv = compiled.transitionValues(values);
    } catch (err) {
      if (err instanceof LifeCycleFormulaError || err instanceof RangeError) return false;
      throw err;
    }
    fill(tv, out);
    return true;
  };
  const work = Float64Array.from(compiled.baseValues);
  return {
    doc,
    n,
    compiled,
    analysis,
    lambda: analysis.lambda,
    a,
    w,
    vitalRates,
    rates,
    entries,
    matrixAtValues,
    rateMatrixAt(slot, x, out) {
      work.set(compiled.baseValues);
      work[slot] = x;
      return matrixAtValues(work, out);
    },
    entryMatrixAt(row, col, x, out) {
      out.set(a);
      out[row * n + col] = x;
      return x >= 0 && Number.isFinite(x);
    },
  };
}
