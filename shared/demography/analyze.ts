// One call for the whole standard analysis of a projection matrix. Sound but
// odd matrices (reducible, imprimitive, 1×1, zero) never throw: the affected
// fields are null, `nullReasons` says why in plain words, and `diagnostics`
// explains the matrix. Only input that cannot be read throws
// (MatrixInputError: not square, ragged, empty, NaN/±Infinity, too large).
import { graphStructure, reachableFrom } from "./graph";
import {
  convergenceTime as convergenceTimeOf,
  dampingFromEigenvalues,
  dominantEigenDense,
  oscillationPeriod,
  type EigenMethod,
  type SecondEigenvalue,
} from "./eigen";
import { sensitivityAnalysisDense } from "./sensitivity";
import { blockSpectralRadii, diagnoseDense, fmt, isSound, structureReport, type Diagnostic, type StructureReport } from "./diagnostics";
import { lifeHistoryDense, type LifeHistory } from "./life-history";
import { DEFAULT_TRANSIENT_HORIZON, projectDense, transientIndicesDense, type Projection, type TransientIndices } from "./projection";
import { MatrixInputError, MAX_PROJECTION_STEPS, readPopulationVector, readSquareMatrix, readStageNames, readStepCount } from "./input";

/** Default number of projection steps when an initial population is given. */
export const DEFAULT_PROJECTION_STEPS = 50;

export interface AnalyzeInput {
  /** Projection matrix, rows = stage at t+1, columns = stage at t (a_ij: from j to i). */
  readonly A: readonly (readonly number[])[];
  /** Survival/growth part of A (optional; with F enables life history and more checks). */
  readonly U?: readonly (readonly number[])[];
  /** Reproduction part of A. */
  readonly F?: readonly (readonly number[])[];
  readonly stageNames?: readonly string[];
  /** Initial population (individuals per stage) for the projection and transient indices. */
  readonly initial?: readonly number[];
  /** Projection length in intervals (default 50). */
  readonly projectionSteps?: number;
  /** Horizon for the transient maxima and bounds (default 100 intervals). */
  readonly transientHorizon?: number;
  /** The x in the convergence time t_x = ln x / ln ρ (default 10). */
  readonly convergenceFactor?: number;
}

export interface MatrixAnalysis {
  readonly stageCount: number;
  readonly stageNames: string[];
  /** Dominant eigenvalue (asymptotic growth factor per projection interval). */
  readonly lambda: number;
  /** Stable stage distribution w (proportions, Σ = 1). */
  readonly stableStage: number[] | null;
  /** Reproductive values v, scaled as reproductiveValueScaling says. */
  readonly reproductiveValue: number[] | null;
  readonly reproductiveValueScaling: { readonly index: number; readonly note: string } | null;
  /** s_ij = ∂λ/∂a_ij. */
  readonly sensitivity: number[][] | null;
  /** e_ij = (a_ij/λ) s_ij, Σ = 1. */
  readonly elasticity: number[][] | null;
  /** true where a_ij = 0: the sensitivity there is not an actionable lever. */
  readonly structuralZero: boolean[][];
  /** λ₂ (largest modulus after λ; im ≥ 0, the conjugate is implied). */
  readonly secondEigenvalue: SecondEigenvalue | null;
  /** ρ = λ/|λ₂| (dimensionless). */
  readonly dampingRatio: number | null;
  /** 2π/|arg λ₂| (projection intervals) when λ₂ is complex. */
  readonly period: number | null;
  /** t_x = ln x / ln ρ (projection intervals), x = convergenceFactor. */
  readonly convergenceTime: number | null;
  readonly convergenceFactor: number;
  /** ‖Aw − λw‖₁ (Σw = 1) and ‖vᵀA − λvᵀ‖₁/‖v‖₁, units of λ. */
  readonly residual: { readonly right: number; readonly left: number };
  readonly converged: boolean;
  readonly iterations: number;
  readonly method: EigenMethod;
  readonly diagnostics: Diagnostic[];
  readonly isSound: boolean;
  readonly structure: StructureReport;
  readonly lifeHistory: LifeHistory | null;
  readonly projection: Projection | null;
  readonly transient: TransientIndices | null;
  /** For each top-level field that is null: why, in plain words. */
  readonly nullReasons: Record<string, string>;
}

/** Full analysis of a projection matrix (λ per projection interval; see MatrixAnalysis for every field's units). */
export function analyzeMatrix(input: AnalyzeInput): MatrixAnalysis {
  const { n, data: a } = readSquareMatrix(input.A, "A");
  const u = input.U === undefined ? null : readSquareMatrix(input.U, "U", n).data;
  const f = input.F === undefined ? null : readSquareMatrix(input.F, "F", n).data;
  const names = readStageNames(input.stageNames, n);
  const initial = input.initial === undefined ? null : readPopulationVector(input.initial, n);
  const steps = input.projectionSteps === undefined ? DEFAULT_PROJECTION_STEPS : readStepCount(input.projectionSteps, "projectionSteps", MAX_PROJECTION_STEPS);
  const horizon = input.transientHorizon === undefined ? DEFAULT_TRANSIENT_HORIZON : readStepCount(input.transientHorizon, "transientHorizon", MAX_PROJECTION_STEPS);
  const factor = input.convergenceFactor ?? 10;
  if (typeof factor !== "number" || !(factor > 1) || !Number.isFinite(factor)) {
    throw new MatrixInputError("convergenceFactor must be a number greater than 1.", "convergenceFactor");
  }

  const nullReasons: Record<string, string> = {};
  const structure = graphStructure(a, n);
  const eig = dominantEigenDense(a, n, { second: n > 1, structure });
  const blockRadii = blockSpectralRadii(a, n, structure, eig.lambda);
  const report = structureReport(structure, blockRadii);
  const diagnostics = diagnoseDense({ n, a, u, f, names, structure, blockRadii });

  let lambda = eig.lambda;
  let w: Float64Array | null = eig.w;
  let v: Float64Array | null = eig.v;
  let vScaleIndex = eig.vScaleIndex;
  let second = eig.second;
  let differentiable = true;
  const shared = report.blocks.filter((b) => b.dominant).length > 1;
  const dominant = report.dominantBlock === null ? null : report.blocks[report.dominantBlock];

  if (!structure.hasCycle) {
    lambda = 0;
    w = null;
    v = null;
    second = null;
    differentiable = false;
    const why = n === 1 || allZero(a) ? "every entry is zero" : "no stage can lead back to itself";
    nullReasons.stableStage = `λ = 0 (${why}): every cohort dies out, so there is no stable stage distribution.`;
    nullReasons.reproductiveValue = `λ = 0 (${why}), so there are no reproductive values.`;
    nullReasons.sensitivity = "λ = 0 is a repeated eigenvalue here and has no derivative with respect to the entries.";
    nullReasons.secondEigenvalue = n === 1 ? "A 1×1 matrix has a single eigenvalue." : "Every eigenvalue is 0.";
  } else if (shared && dominant) {
    // Two groups with the same growth rate: λ is repeated, w and v are not unique.
    lambda = Math.max(...blockRadii);
    w = null;
    v = null;
    differentiable = false;
    second = { re: lambda, im: 0, modulus: lambda, converged: true };
    nullReasons.stableStage = "Two separate groups of stages share the growth rate λ, so the long-run structure depends on the initial population: there is no single stable stage distribution.";
    nullReasons.reproductiveValue = "λ is shared by two separate groups of stages, so reproductive values are not unique.";
    nullReasons.sensitivity = "λ is a repeated eigenvalue (shared by two groups of stages) and has no derivative with respect to the entries.";
  } else if (!structure.irreducible && dominant && w !== null && v !== null) {
    // Reducible with one dominant group. The spectrum is the union of the
    // diagonal blocks' spectra, so λ is that block's own radius (exact for a
    // one-stage block such as long-lived post-breeders), and the graph makes
    // some entries of w and v exactly zero.
    lambda = dominant.spectralRadius;
    const down = reachableFrom(structure.graph(), dominant.stages, 0);
    const up = reachableFrom(structure.reverse(), dominant.stages, 0);
    let s = 0;
    for (let i = 0; i < n; i++) {
      if (down[i] === 0) w[i] = 0;
      if (up[i] === 0) v[i] = 0;
      s += w[i] as number;
    }
    for (let i = 0; i < n; i++) w[i] = (w[i] as number) / s;
    vScaleIndex = 0;
    while (v[vScaleIndex] === 0 && vScaleIndex < n - 1) vScaleIndex += 1;
    const pivot = v[vScaleIndex] as number;
    for (let i = 0; i < n; i++) v[i] = (v[i] as number) / pivot;
  }

  // λ₂ on the top circle of an imprimitive dominant group is exact: λ·e^{2πi/d}.
  if (dominant && !shared && dominant.period !== null && dominant.period > 1 && lambda > 0) {
    const d = dominant.period;
    second = d === 2 ? { re: -lambda, im: 0, modulus: lambda, converged: true } : { re: lambda * Math.cos((2 * Math.PI) / d), im: lambda * Math.sin((2 * Math.PI) / d), modulus: lambda, converged: true };
  }

  if (n === 1 && structure.hasCycle) nullReasons.secondEigenvalue = "A 1×1 matrix has a single eigenvalue.";
  const rho = dampingFromEigenvalues(lambda, second);
  if (rho === null && !nullReasons.dampingRatio) {
    nullReasons.dampingRatio =
      second === null
        ? "There is no second eigenvalue."
        : lambda > 0
          ? "λ₂ = 0 to working precision: the stage structure reaches the stable distribution within a finite number of steps, so the damping ratio is infinite."
          : "λ = 0.";
  }
  const period = oscillationPeriod(second);
  if (period === null) {
    nullReasons.period =
      second === null
        ? "There is no second eigenvalue."
        : second.re < 0
          ? "λ₂ is real and negative: deviations from the stable structure alternate in sign every step rather than cycle."
          : "λ₂ is real: the approach to the stable structure does not oscillate.";
  }
  const tx = convergenceTimeOf(rho, factor);
  if (tx === null) {
    nullReasons.convergenceTime =
      rho === null ? (nullReasons.dampingRatio ?? "No damping ratio.") : `The damping ratio is ${fmt(rho)} ≤ 1: the stage structure never converges to the stable distribution.`;
  }

  let sens: ReturnType<typeof sensitivityAnalysisDense> = null;
  if (differentiable && w !== null && v !== null) {
    sens = sensitivityAnalysisDense(a, n, { lambda, w, v });
    if (sens === null) nullReasons.sensitivity = "⟨v, w⟩ = 0: λ is defective and has no derivative with respect to the entries.";
  }
  if (sens === null) {
    nullReasons.elasticity = nullReasons.sensitivity ?? "Sensitivities are not defined.";
  }

  const extra: Diagnostic[] = [];
  if (!eig.converged && structure.hasCycle && !shared) {
    extra.push({
      code: "not-converged",
      severity: "warning",
      message: `The eigenvalue computation did not reach full accuracy (residual ${fmt(Math.max(eig.residualRight, eig.residualLeft))}); λ = ${fmt(lambda)} and the vectors are best estimates.`,
      stages: [],
    });
  }
  if (second !== null && !second.converged) {
    extra.push({
      code: "second-eigenvalue-not-converged",
      severity: "info",
      message: `The second eigenvalue did not reach its accuracy target, so the damping ratio${rho === null ? "" : ` (${fmt(rho)})`} and convergence time are approximate.`,
      stages: [],
    });
  }
  const allDiagnostics = [...diagnostics, ...extra];

  let lifeHistory: LifeHistory | null = null;
  if (u !== null && f !== null) {
    const outcome = lifeHistoryDense(u, f, n, { lambda, w, v }, names);
    lifeHistory = outcome.lifeHistory;
    if (outcome.reason !== null) nullReasons.lifeHistory = outcome.reason;
  } else {
    nullReasons.lifeHistory = u === null && f === null ? "U and F were not given: life expectancy, R0 and generation time need A split into survival (U) and reproduction (F)." : `${u === null ? "U" : "F"} was not given: the life-history quantities need both U and F.`;
  }

  let projection: Projection | null = null;
  let transient: TransientIndices | null = null;
  if (initial === null) {
    nullReasons.projection = "No initial population was given.";
    nullReasons.transient = "No initial population was given.";
  } else {
    projection = projectDense(a, n, initial, steps, w);
    if (lambda > 0 && w !== null && v !== null) transient = transientIndicesDense(a, n, initial, { lambda, w, v }, horizon);
    else nullReasons.transient = lambda > 0 ? "λ is shared by two groups of stages, so w and v (needed to standardise) are not unique." : "λ = 0: there is no growth rate to standardise by.";
  }

  let scaling: MatrixAnalysis["reproductiveValueScaling"] = null;
  if (v !== null) {
    const first = names[0] as string;
    scaling =
      vScaleIndex === 0
        ? { index: 0, note: `Reproductive values are relative to ${first} (its value is 1).` }
        : {
            index: vScaleIndex,
            note: `${first} has reproductive value 0 (it cannot lead back to the part of the life cycle λ comes from), so reproductive values are relative to ${names[vScaleIndex]} (its value is 1).`,
          };
  }

  return {
    stageCount: n,
    stageNames: names,
    lambda,
    stableStage: w === null ? null : Array.from(w),
    reproductiveValue: v === null ? null : Array.from(v),
    reproductiveValueScaling: scaling,
    sensitivity: sens?.sensitivity ?? null,
    elasticity: sens?.elasticity ?? null,
    structuralZero: sens?.structuralZero ?? zeroMask(a, n),
    secondEigenvalue: second,
    dampingRatio: rho,
    period,
    convergenceTime: tx,
    convergenceFactor: factor,
    residual: { right: eig.residualRight, left: eig.residualLeft },
    converged: eig.converged,
    iterations: eig.iterations,
    method: eig.method,
    diagnostics: allDiagnostics,
    isSound: isSound(allDiagnostics),
    structure: report,
    lifeHistory,
    projection,
    transient,
    nullReasons,
  };
}

function allZero(a: Float64Array): boolean {
  for (let k = 0; k < a.length; k++) if (a[k] !== 0) return false;
  return true;
}

function zeroMask(a: Float64Array, n: number): boolean[][] {
  const out = new Array<boolean[]>(n);
  for (let i = 0; i < n; i++) {
    const row = new Array<boolean>(n);
    for (let j = 0; j < n; j++) row[j] = a[i * n + j] === 0;
    out[i] = row;
  }
  return out;
}
