// Sensitivity and elasticity of λ to every matrix entry (Caswell 2001, ch. 9):
// s_ij = ∂λ/∂a_ij = v_i w_j / ⟨v, w⟩ and e_ij = (a_ij/λ) s_ij, which sum to 1.
// Sensitivities exist for structural zeros (a_ij = 0) too — they say how λ
// would respond if that transition existed — so they are returned along with a
// mask that lets the interface flag them as non-actionable.
import { readSquareMatrix } from "./input";
import { dominantEigenDense } from "./eigen";

export interface SensitivityAnalysis {
  /** s_ij = ∂λ/∂a_ij (units of λ per unit of a_ij). */
  readonly sensitivity: number[][];
  /** e_ij = ∂log λ/∂log a_ij (dimensionless, Σ = 1); null when λ = 0. */
  readonly elasticity: number[][] | null;
  /** structuralZero[i][j] = (a_ij === 0): a lever that does not exist in this life cycle. */
  readonly structuralZero: boolean[][];
}

/** Eigen-quantities the formulas need. */
export interface EigenTriple {
  readonly lambda: number;
  readonly w: ArrayLike<number>;
  readonly v: ArrayLike<number>;
}

/**
 * S, E and the structural-zero mask in one pass over a row-major matrix.
 * Returns null when ⟨v, w⟩ vanishes (λ defective: not differentiable).
 */
export function sensitivityAnalysisDense(a: Float64Array, n: number, eig: EigenTriple): SensitivityAnalysis | null {
  const { lambda, w, v } = eig;
  let vw = 0;
  let vMax = 0;
  let wMax = 0;
  for (let i = 0; i < n; i++) {
    vw += (v[i] as number) * (w[i] as number);
    vMax = Math.max(vMax, Math.abs(v[i] as number));
    wMax = Math.max(wMax, Math.abs(w[i] as number));
  }
  if (!(Math.abs(vw) > 1e-12 * vMax * wMax)) return null;
  const withElasticity = lambda > 0;
  const invLambda = withElasticity ? 1 / lambda : 0;
  const sensitivity = new Array<number[]>(n);
  const elasticity = withElasticity ? new Array<number[]>(n) : null;
  const structuralZero = new Array<boolean[]>(n);
  for (let i = 0; i < n; i++) {
    const vi = (v[i] as number) / vw;
    const sRow = new Array<number>(n);
    const eRow = new Array<number>(n);
    const zRow = new Array<boolean>(n);
    const base = i * n;
    for (let j = 0; j < n; j++) {
      const s = vi * (w[j] as number);
      const aij = a[base + j] as number;
      sRow[j] = s;
      eRow[j] = aij * s * invLambda;
      zRow[j] = aij === 0;
    }
    sensitivity[i] = sRow;
    if (elasticity) elasticity[i] = eRow;
    structuralZero[i] = zRow;
  }
  return { sensitivity, elasticity, structuralZero };
}

/** Sensitivity matrix s_ij = ∂λ/∂a_ij (units of λ per unit of a_ij); null when λ is defective (no derivative). */
export function sensitivities(A: readonly (readonly number[])[]): number[][] | null {
  return sensitivityAnalysis(A)?.sensitivity ?? null;
}

/** Elasticity matrix e_ij = (a_ij/λ) ∂λ/∂a_ij (dimensionless, sums to 1); null when λ = 0 or defective. */
export function elasticities(A: readonly (readonly number[])[]): number[][] | null {
  return sensitivityAnalysis(A)?.elasticity ?? null;
}

/** Mask of structural zeros: true where a_ij = 0. */
export function structuralZeros(A: readonly (readonly number[])[]): boolean[][] {
  return A.map((row) => row.map((x) => x === 0));
}

/**
 * Sensitivities, elasticities and structural zeros together (one
 * eigen-analysis, one pass); null when ⟨v, w⟩ = 0 (λ defective, as when two
 * separate groups of stages share the same growth rate), where λ has no
 * derivative with respect to the entries.
 */
export function sensitivityAnalysis(A: readonly (readonly number[])[]): SensitivityAnalysis | null {
  const { n, data } = readSquareMatrix(A, "A");
  const eig = dominantEigenDense(data, n, { second: false });
  return sensitivityAnalysisDense(data, n, eig);
}
