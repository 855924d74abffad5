// Life-history quantities from the split A = U + F (Caswell 2001, ch. 5;
// Caswell 2009, Oikos 118:1763 for R0 and generation time).
//
// Conventions used throughout this file:
// - Time is counted in projection intervals. An individual is followed from
//   the census at which it is in its starting stage j; that census is its
//   age 0 in this reckoning.
// - Life expectancy η_j = Σ_i N_ij counts the current interval: an
//   individual that dies before the next census has η = 1.
// - A stage is "reproductive" when its column of F has a positive entry:
//   individuals in it produce offspring during the coming interval.
// - Age at first reproduction from stage j is the number of intervals until
//   the individual first occupies a reproductive stage: 0 if j itself is
//   reproductive, 1 if it moves straight into one, and so on. It is the mean
//   over individuals that do get there (conditioned on reaching
//   reproduction, Cochran & Ellner 1992, Ecol. Monogr. 62:345; Caswell 2001,
//   §5.3), via the absorbing Markov chain in which reproductive stages absorb.
import { matvec, toArray } from "./matrix";
import { luFactor, luSolve, luSolveTransposed } from "./lu";
import { spectralRadiusDense, dominantEigenDense } from "./eigen";
import { graphStructure, reachableFrom, reverseGraph, lifeCycleGraph } from "./graph";
import { readSquareMatrix, readStageNames } from "./input";
import { fmt } from "./diagnostics";

export interface LifeHistory {
  /** N = (I − U)⁻¹: N_ij is the expected number of intervals spent in stage i by an individual now in stage j (counting the current one). */
  readonly fundamentalMatrix: number[][];
  /** η_j = Σ_i N_ij: expected remaining lifespan from stage j (projection intervals, current one included). */
  readonly lifeExpectancy: number[];
  /** Var(η) = 1ᵀ(2N − I)N − η∘η (projection intervals squared). */
  readonly lifeExpectancyVariance: number[];
  /** R0 = spectral radius of F N (offspring per individual per lifetime). */
  readonly netReproductiveRate: number;
  /** T_R0 = ln R0 / ln λ (projection intervals); null with a reason in nullReasons. */
  readonly generationTimeR0: number | null;
  /** Mean age of parents T̄ = λ (v·w)/(v F w) (projection intervals; Bienvenu & Legendre 2015, Am. Nat. 185:834). */
  readonly meanAgeOfParents: number | null;
  /** Stages whose F column has a positive entry (0-based). */
  readonly reproductiveStages: number[];
  /** Probability that an individual now in stage j ever reaches a reproductive stage (1 for reproductive stages). */
  readonly probabilityOfReproducing: number[];
  /** Mean number of intervals until first reaching a reproductive stage, given that it does; null where it never can. */
  readonly meanAgeAtFirstReproduction: (number | null)[];
  /** Why a null above is null, by field name. */
  readonly nullReasons: Record<string, string>;
}

export type LifeHistoryOutcome = { readonly lifeHistory: LifeHistory; readonly reason: null } | { readonly lifeHistory: null; readonly reason: string };

/** λ, w, v of A = U + F, as the mean age of parents needs them. */
export interface DominantTriple {
  readonly lambda: number;
  readonly w: ArrayLike<number> | null;
  readonly v: ArrayLike<number> | null;
}

/** Life-history quantities from row-major U and F. */
export function lifeHistoryDense(u: Float64Array, f: Float64Array, n: number, eig: DominantTriple, names: readonly string[]): LifeHistoryOutcome {
  const iMinusU = new Float64Array(n * n);
  for (let k = 0; k < n * n; k++) iMinusU[k] = -(u[k] as number);
  for (let i = 0; i < n; i++) iMinusU[i * n + i] = 1 + (iMinusU[i * n + i] as number);
  const lu = luFactor(iMinusU, n);
  const immortal = (): string => {
    const full: number[] = [];
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let i = 0; i < n; i++) s += u[i * n + j] as number;
      if (s >= 1 - 1e-12) full.push(j);
    }
    const where = full.length > 0 ? ` (survival is 1 or more out of ${full.map((j) => names[j]).join(", ")})` : "";
    return `I − U is singular or U lets some individuals live forever${where}: life expectancy is infinite, so N = (I − U)⁻¹, R0 and the other life-history quantities do not exist.`;
  };
  if (lu.singular) return { lifeHistory: null, reason: immortal() };

  // N column by column.
  const N = new Float64Array(n * n);
  const e = new Float64Array(n);
  for (let j = 0; j < n; j++) {
    e.fill(0);
    e[j] = 1;
    const col = luSolve(lu, e);
    for (let i = 0; i < n; i++) N[i * n + j] = col[i] as number;
  }
  let nMax = 0;
  let nMin = 0;
  for (let k = 0; k < n * n; k++) {
    nMax = Math.max(nMax, N[k] as number);
    nMin = Math.min(nMin, N[k] as number);
  }
  // For non-negative U, N ≥ 0 exactly when the spectral radius of U is below 1.
  if (nMin < -1e-9 * nMax || !Number.isFinite(nMax)) return { lifeHistory: null, reason: immortal() };

  const nullReasons: Record<string, string> = {};
  const eta = new Float64Array(n);
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) eta[j] = (eta[j] as number) + (N[i * n + j] as number);
  const variance = new Array<number>(n);
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += (2 * (eta[i] as number) - 1) * (N[i * n + j] as number);
    variance[j] = s - (eta[j] as number) * (eta[j] as number);
  }

  // R0 = ρ(F N); F usually has few non-zero entries, so skip its zeros.
  const FN = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < n; k++) {
      const fik = f[i * n + k] as number;
      if (fik === 0) continue;
      for (let j = 0; j < n; j++) FN[i * n + j] = (FN[i * n + j] as number) + fik * (N[k * n + j] as number);
    }
  }
  const R0 = spectralRadiusDense(FN, n).value;

  const { lambda } = eig;
  let generationTimeR0: number | null = null;
  if (!(R0 > 0)) nullReasons.generationTimeR0 = "R0 = 0: no individual ever reproduces, so ln R0 is undefined.";
  else if (!(lambda > 0)) nullReasons.generationTimeR0 = "λ = 0, so ln λ is undefined.";
  else if (Math.abs(Math.log(lambda)) < 1e-12) {
    nullReasons.generationTimeR0 = "λ = 1, so ln R0 / ln λ is 0/0; the mean age of parents gives the generation time instead.";
  } else {
    const t = Math.log(R0) / Math.log(lambda);
    if (t > 0 && Number.isFinite(t)) generationTimeR0 = t;
    else nullReasons.generationTimeR0 = `ln R0 and ln λ have opposite signs (R0 = ${fmt(R0)}, λ = ${fmt(lambda)}; possible when the life cycle is reducible), so ln R0 / ln λ is not a generation time.`;
  }

  let meanAgeOfParents: number | null = null;
  if (eig.w === null || eig.v === null || !(lambda > 0)) {
    nullReasons.meanAgeOfParents = "λ, w or v is not defined for this matrix (see the eigen-analysis).";
  } else {
    const w = Float64Array.from(eig.w);
    const fw = new Float64Array(n);
    matvec(f, n, w, fw);
    let vw = 0;
    let vfw = 0;
    for (let i = 0; i < n; i++) {
      vw += (eig.v[i] as number) * (w[i] as number);
      vfw += (eig.v[i] as number) * (fw[i] as number);
    }
    if (vfw > 0) meanAgeOfParents = (lambda * vw) / vfw;
    else nullReasons.meanAgeOfParents = "v F w = 0: no reproduction carries reproductive value, so the mean age of parents is undefined.";
  }

  // Reaching reproduction: reproductive stages absorb.
  const reproductive: number[] = [];
  for (let j = 0; j < n; j++) {
    for (let i = 0; i < n; i++) {
      if ((f[i * n + j] as number) > 0) {
        reproductive.push(j);
        break;
      }
    }
  }
  const isRepro = new Uint8Array(n);
  for (const j of reproductive) isRepro[j] = 1;
  const prob = new Array<number>(n).fill(0);
  const age: (number | null)[] = new Array<number | null>(n).fill(null);
  for (const j of reproductive) {
    prob[j] = 1;
    age[j] = 0;
  }
  const transient = Array.from({ length: n }, (_, j) => j).filter((j) => isRepro[j] === 0);
  if (reproductive.length === 0) {
    nullReasons.meanAgeAtFirstReproduction = "No stage reproduces (F has no positive entry).";
  } else if (transient.length > 0) {
    // Which transient stages can reach reproduction at all, along U.
    const canReach = reachableFrom(reverseGraph(lifeCycleGraph(u, n)), reproductive, 0);
    const t = transient.length;
    const M = new Float64Array(t * t);
    const into = new Float64Array(t);
    for (let r = 0; r < t; r++) {
      const j = transient[r] as number;
      let s = 0;
      for (const i of reproductive) s += u[i * n + j] as number;
      into[r] = s;
      for (let c = 0; c < t; c++) M[c * t + r] = (c === r ? 1 : 0) - (u[(transient[c] as number) * n + j] as number);
    }
    // (I − U_TT)ᵀ p = u_RT 1: p_j = P(enter R from j before death).
    const luT = luFactor(M, t);
    const p = luSolveTransposed(luT, into);
    const x = luSolveTransposed(luT, p);
    let unreachable = false;
    for (let r = 0; r < t; r++) {
      const j = transient[r] as number;
      if (canReach[j] === 0) {
        prob[j] = 0;
        age[j] = null;
        unreachable = true;
        continue;
      }
      const pj = Math.min(1, Math.max(0, p[r] as number));
      prob[j] = pj;
      // Conditioned chain (Caswell 2001 §5.3): mean time = (pᵀ N_T)_j / p_j.
      age[j] = pj > 0 ? (x[r] as number) / (p[r] as number) : null;
    }
    if (unreachable) {
      nullReasons.meanAgeAtFirstReproduction = "null where a stage can never reach a reproductive stage, so the conditional age is undefined.";
    }
  }

  return {
    lifeHistory: {
      fundamentalMatrix: rows(N, n),
      lifeExpectancy: toArray(eta),
      lifeExpectancyVariance: variance,
      netReproductiveRate: R0,
      generationTimeR0,
      meanAgeOfParents,
      reproductiveStages: reproductive,
      probabilityOfReproducing: prob,
      meanAgeAtFirstReproduction: age,
      nullReasons,
    },
    reason: null,
  };
}

/** Life expectancy, R0, generation times and age at first reproduction from U (survival/growth) and F (reproduction). */
export function lifeHistory(input: { readonly U: unknown; readonly F: unknown; readonly stageNames?: unknown }): LifeHistoryOutcome {
  const { n, data: u } = readSquareMatrix(input.U, "U");
  const f = readSquareMatrix(input.F, "F", n).data;
  const names = readStageNames(input.stageNames, n);
  const a = new Float64Array(n * n);
  for (let k = 0; k < n * n; k++) a[k] = (u[k] as number) + (f[k] as number);
  const structure = graphStructure(a, n);
  const eig = dominantEigenDense(a, n, { second: false, structure });
  const defined = structure.hasCycle;
  return lifeHistoryDense(u, f, n, { lambda: eig.lambda, w: defined ? eig.w : null, v: defined ? eig.v : null }, names);
}

function rows(a: Float64Array, n: number): number[][] {
  const out = new Array<number[]>(n);
  for (let i = 0; i < n; i++) out[i] = Array.from(a.subarray(i * n, (i + 1) * n));
  return out;
}
