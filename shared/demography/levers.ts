// Levers: the exact change in λ when one parameter of a model (a vital rate or
// a matrix entry) changes, found by recomputing λ on the changed matrix rather
// than by the first-order approximation Δλ ≈ s·Δx. Elasticities rank
// proportional changes only to first order and say nothing of feasibility or
// cost (Mills, Doak & Wisdom 1999, Conserv. Biol. 13:815; Caswell 2000,
// Ecology 81:619), so the exact response is shown next to them.
import { perronFrom } from "./eigen";

/** Allowed range of a parameter; either end may be infinite. */
export interface ParameterBounds {
  readonly lower: number;
  readonly upper: number;
}

/**
 * Fills `out` (row-major n×n) with the projection matrix at parameter value
 * `x`, everything else at baseline. Returns false when the model is not
 * defined there (a formula that cannot be evaluated, a negative entry).
 */
export type MatrixAt = (x: number, out: Float64Array) => boolean;

/** λ and w of the baseline model, the starting point of every recomputation. */
export interface Baseline {
  readonly n: number;
  readonly lambda: number;
  /** Stable stage distribution of the baseline (Σ = 1). */
  readonly w: Float64Array;
}

export interface ExactChange {
  /** The parameter's baseline value. */
  readonly from: number;
  /** The value asked for. */
  readonly requested: number;
  /** The value used: `requested` kept within the bounds. */
  readonly to: number;
  /** Which bound stopped the change, if one did. */
  readonly limitedBy: "lower" | "upper" | null;
  /** λ of the changed model (per projection interval); NaN when the model is undefined there. */
  readonly lambda: number;
  /** λ(changed) − λ(baseline), exact. */
  readonly deltaLambda: number;
}

/** A requested value kept within bounds, and which bound (if any) it hit. */
export function boundedTarget(requested: number, bounds: ParameterBounds): { to: number; limitedBy: "lower" | "upper" | null } {
  if (requested > bounds.upper) return { to: bounds.upper, limitedBy: "upper" };
  if (requested < bounds.lower) return { to: bounds.lower, limitedBy: "lower" };
  return { to: requested, limitedBy: null };
}

/** Exact λ of a non-negative matrix (row-major, n×n), warm-started from a vector near its Perron vector when one is given. */
export function exactLambda(a: Float64Array, n: number, start: Float64Array | null = null): { lambda: number; w: Float64Array } {
  if (n === 1) return { lambda: a[0] as number, w: Float64Array.of(1) };
  const r = perronFrom(a, n, start === null ? null : { w: start });
  return { lambda: r.lambda, w: r.w };
}

/**
 * The exact response of λ to moving one parameter from `from` to `requested`
 * (kept within `bounds`): λ is recomputed on the changed matrix.
 */
export function exactChange(baseline: Baseline, matrixAt: MatrixAt, from: number, requested: number, bounds: ParameterBounds, work?: Float64Array): ExactChange {
  const { n } = baseline;
  const { to, limitedBy } = boundedTarget(requested, bounds);
  const a = work ?? new Float64Array(n * n);
  if (to === from) return { from, requested, to, limitedBy, lambda: baseline.lambda, deltaLambda: 0 };
  if (!matrixAt(to, a)) return { from, requested, to, limitedBy, lambda: NaN, deltaLambda: NaN };
  const { lambda } = exactLambda(a, n, baseline.w);
  return { from, requested, to, limitedBy, lambda, deltaLambda: lambda - baseline.lambda };
}

/** Indices 0…k−1 ordered by decreasing |key| (NaN last); ties keep their order. */
export function rankByMagnitude(keys: ArrayLike<number>): number[] {
  const idx = Array.from({ length: keys.length }, (_, i) => i);
  const mag = (i: number) => {
    const v = Math.abs(keys[i] as number);
    return Number.isNaN(v) ? -1 : v;
  };
  return idx.sort((p, q) => mag(q) - mag(p) || p - q);
}
