// Fixed-design life-table response experiment (Caswell 1989, Ecol. Model.
// 46:221; Caswell 2001 §10.1): the difference in λ between a comparison
// matrix A(m) and a reference A(r) decomposed into contributions of the
// entries, c_ij = (a_ij(m) − a_ij(r)) · s_ij, with the sensitivities taken at
// the midpoint matrix (A(m) + A(r))/2. The contributions sum to Δλ only to
// first order; the exact Δλ and the approximation error are returned beside
// them. An LTRE explains a difference that happened; it does not by itself
// say which action would help (Caswell 2000, Ecology 81:619).
import { dominantEigenDense } from "./eigen";
import { readSquareMatrix } from "./input";
import { sensitivityAnalysisDense } from "./sensitivity";

export interface LtreResult {
  /** λ of the reference and of the comparison matrix (per projection interval). */
  readonly lambdaReference: number;
  readonly lambdaComparison: number;
  /** λ(comparison) − λ(reference), exact. */
  readonly deltaLambda: number;
  /** λ of the midpoint matrix the sensitivities are taken at. */
  readonly lambdaMidpoint: number;
  /** ∂λ/∂a_ij at the midpoint matrix. */
  readonly sensitivity: number[][];
  /** c_ij = (a_ij(m) − a_ij(r)) s_ij (units of λ), row = stage at t+1, column = stage at t. */
  readonly contributions: number[][];
  /** Σ c_ij, the first-order estimate of Δλ. */
  readonly total: number;
  /** total − Δλ. */
  readonly error: number;
  /** |total − Δλ| / |Δλ| (null when Δλ = 0). */
  readonly relativeError: number | null;
}

export class LtreError extends Error {
  override readonly name = "LtreError";
}

function lambdaOf(a: Float64Array, n: number): number {
  return dominantEigenDense(a, n, { second: false }).lambda;
}

/** Midpoint sensitivities, or null when λ at the midpoint has no derivative (repeated λ). */
export function midpointSensitivities(mid: Float64Array, n: number): { lambda: number; sensitivity: number[][] } | null {
  const eig = dominantEigenDense(mid, n, { second: false });
  if (!(eig.lambda > 0)) return null;
  const sens = sensitivityAnalysisDense(mid, n, eig);
  return sens === null ? null : { lambda: eig.lambda, sensitivity: sens.sensitivity };
}

/** Fixed-design LTRE contributions of every matrix entry to λ(comparison) − λ(reference) (units of λ per projection interval). */
export function ltreContributions(reference: readonly (readonly number[])[], comparison: readonly (readonly number[])[]): LtreResult {
  const { n, data: r } = readSquareMatrix(reference, "reference");
  const { data: m } = readSquareMatrix(comparison, "comparison", n);
  const mid = new Float64Array(n * n);
  for (let k = 0; k < n * n; k++) mid[k] = ((r[k] as number) + (m[k] as number)) / 2;
  const at = midpointSensitivities(mid, n);
  if (at === null) {
    throw new LtreError("λ of the midpoint matrix is zero or repeated (two separate groups of stages share it), so it has no sensitivities and the difference cannot be decomposed.");
  }
  const lambdaReference = lambdaOf(r, n);
  const lambdaComparison = lambdaOf(m, n);
  const deltaLambda = lambdaComparison - lambdaReference;
  const contributions: number[][] = [];
  let total = 0;
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n);
    for (let j = 0; j < n; j++) {
      const c = ((m[i * n + j] as number) - (r[i * n + j] as number)) * (at.sensitivity[i]![j] as number);
      row[j] = c;
      total += c;
    }
    contributions.push(row);
  }
  const error = total - deltaLambda;
  return {
    lambdaReference,
    lambdaComparison,
    deltaLambda,
    lambdaMidpoint: at.lambda,
    sensitivity: at.sensitivity,
    contributions,
    total,
    error,
    relativeError: deltaLambda === 0 ? null : Math.abs(error) / Math.abs(deltaLambda),
  };
}
