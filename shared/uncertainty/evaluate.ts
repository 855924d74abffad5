/**
 * The headline results of one set of vital-rate values, computed lean on
 * Float64Array: λ, w, v (Caswell 2001 ch. 4), elasticities of λ to the
 * non-zero matrix entries and to the vital rates (ch. 9), R0 and the two
 * generation times (METHODS.md §0). Used for every Monte Carlo draw and for
 * the delta method's numerical derivatives.
 *
 * R0 = ρ(F N), N = (I − U)⁻¹. F N has non-zero rows only where F has (the
 * stages offspring are born into), so its non-zero eigenvalues are those of
 * the small block F[R,:] N[:,R] (permute R first: F N is block upper
 * triangular with a zero block): one solve per offspring stage instead of
 * the whole N.
 */
import { dominantEigenDense, PerronSolver, spectralRadiusDense } from "../demography/eigen";
import { graphStructure } from "../demography/graph";
import { toDense } from "../demography/matrix";
import { luFactor, luSolve } from "../demography/lu";
import { bindExpr, derivativeTree, FormulaEvaluationError, type BoundFormula } from "../lifecycle/formula";
import { formulaRateNames, type CompiledLifeCycle } from "../lifecycle/index";

export interface DrawResult {
  lambda: number;
  w: Float64Array;
  v: Float64Array;
  /** Elasticity of λ to each non-zero cell in `cells` order. */
  entryElasticity: Float64Array;
  /** Elasticity of λ to each vital rate in `leverRates` order; NaN when λ is not differentiable. */
  rateElasticity: Float64Array;
  /** R0, NaN when some individuals never die (I − U singular or N not ≥ 0). */
  r0: number;
  /** ln R0 / ln λ, NaN when undefined (λ = 1, R0 = 0, opposite signs). */
  generationTimeR0: number;
  /** λ (v·w)/(v F w), NaN when undefined. */
  meanAgeOfParents: number;
}

export interface DrawEvaluator {
  readonly n: number;
  /** Non-zero cells of A at the document's values: [row, col]. */
  readonly cells: readonly (readonly [number, number])[];
  /** Rate slots whose elasticity is tracked (rates some formula uses). */
  readonly leverRates: readonly number[];
  /** Evaluate at the full vector of rate values (document order). Throws LifeCycleFormulaError. */
  evaluate(values: Float64Array, out?: DrawResult): DrawResult;
}

/** Rate slots some arrow's formula uses, in document order. */
export function ratesUsedByFormulas(doc: { rates: readonly { name: string }[]; transitions: readonly { rate: number | string }[] }): number[] {
  const used = new Set<string>();
  for (const t of doc.transitions) if (typeof t.rate === "string") for (const name of formulaRateNames(t.rate)) used.add(name);
  return doc.rates.flatMap((r, i) => (used.has(r.name) ? [i] : []));
}

/** A reusable evaluator of one compiled life cycle. */
export function drawEvaluator(
  compiled: CompiledLifeCycle,
  entries: readonly { row: number; col: number; kind: string }[],
  formulas: readonly (number | string)[],
  leverRates: readonly number[],
): DrawEvaluator {
  const n = compiled.stageIds.length;
  const a = new Float64Array(n * n);
  const u = new Float64Array(n * n);
  const f = new Float64Array(n * n);
  const base = compiled.evaluate();
  const cells: [number, number][] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if (base.A[i]![j]! !== 0) cells.push([i, j]);
  const cellIndex = Int32Array.from(entries, (e) => e.row * n + e.col);
  // Draws of an irreducible life cycle that keep every arrow positive stay
  // irreducible: their λ, w, v come from a few warm-started steps from the
  // document's own (PerronSolver, eigen.ts), verified, else the full analysis.
  const baseDense = toDense(base.A);
  const baseEigen = n > 1 && graphStructure(baseDense, n).irreducible ? dominantEigenDense(baseDense, n, { second: false }) : null;
  const warm = baseEigen !== null && baseEigen.converged && baseEigen.w.every((x) => x > 0) && baseEigen.v.every((x) => x > 0) ? baseEigen : null;
  const patternCells = Int32Array.from(cells, ([i, j]) => i * n + j);
  const perron = new PerronSolver(n, { left: true });
  const repro = Uint8Array.from(entries, (e) => (e.kind === "reproduction" ? 1 : 0));
  // ∂a_t/∂x_k for every arrow t and tracked rate k its formula uses, bound once.
  const slotOfName = new Map(compiled.rateNames.map((name, i) => [name, i]));
  const leverOfSlot = new Map(leverRates.map((slot, k) => [slot, k]));
  const partials: { cell: number; lever: number; fn: BoundFormula }[] = [];
  formulas.forEach((formula, t) => {
    if (typeof formula !== "string") return;
    for (const name of formulaRateNames(formula)) {
      const slot = slotOfName.get(name);
      const lever = slot === undefined ? undefined : leverOfSlot.get(slot);
      if (lever === undefined) continue;
      partials.push({ cell: cellIndex[t]!, lever, fn: bindExpr(derivativeTree(formula, name), (r) => slotOfName.get(r)!, formula) });
    }
  });
  const sens = new Float64Array(leverRates.length);
  const iMinusU = new Float64Array(n * n);
  const unit = new Float64Array(n);
  const fw = new Float64Array(n);

  const fresh = (): DrawResult => ({
    lambda: NaN,
    w: new Float64Array(n),
    v: new Float64Array(n),
    entryElasticity: new Float64Array(cells.length),
    rateElasticity: new Float64Array(leverRates.length),
    r0: NaN,
    generationTimeR0: NaN,
    meanAgeOfParents: NaN,
  });

  function netReproductiveRate(): number {
    const offspring: number[] = [];
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) {
        if (f[i * n + j]! !== 0) {
          offspring.push(i);
          break;
        }
      }
    }
    if (offspring.length === 0) return 0;
    for (let k = 0; k < n * n; k++) iMinusU[k] = -u[k]!;
    for (let i = 0; i < n; i++) iMinusU[i * n + i] = 1 + iMinusU[i * n + i]!;
    const lu = luFactor(iMinusU, n);
    if (lu.singular) return NaN;
    const r = offspring.length;
    const K = new Float64Array(r * r);
    for (let c = 0; c < r; c++) {
      unit.fill(0);
      unit[offspring[c]!] = 1;
      const col = luSolve(lu, unit);
      for (let k = 0; k < n; k++) if (col[k]! < -1e-9) return NaN; // N not ≥ 0: ρ(U) ≥ 1
      for (let rr = 0; rr < r; rr++) {
        const row = offspring[rr]! * n;
        let s = 0;
        for (let k = 0; k < n; k++) s += f[row + k]! * col[k]!;
        K[rr * r + c] = s;
      }
    }
    return r === 1 ? K[0]! : spectralRadiusDense(K, r).value;
  }

  return {
    n,
    cells,
    leverRates,
    evaluate(values, out = fresh()) {
      const tv = compiled.transitionValues(values);
      a.fill(0);
      u.fill(0);
      f.fill(0);
      for (let e = 0; e < cellIndex.length; e++) {
        const c = cellIndex[e]!;
        const x = tv[e]!;
        a[c] = a[c]! + x;
        if (repro[e]) f[c] = f[c]! + x;
        else u[c] = u[c]! + x;
      }
      let samePattern = warm !== null;
      for (let k = 0; samePattern && k < patternCells.length; k++) if (!(a[patternCells[k]!]! > 0)) samePattern = false;
      const pair = perron.solve(a, samePattern ? warm : null)!;
      const eig = { lambda: pair.lambda, w: pair.w, v: pair.v! };
      const lambda = eig.lambda;
      out.lambda = lambda;
      out.w.set(eig.w);
      out.v.set(eig.v);
      let vw = 0;
      for (let i = 0; i < n; i++) vw += eig.v[i]! * eig.w[i]!;
      const differentiable = Math.abs(vw) > 1e-300 && lambda > 0;
      for (let k = 0; k < cells.length; k++) {
        const [i, j] = cells[k]!;
        out.entryElasticity[k] = differentiable ? (a[i * n + j]! * eig.v[i]! * eig.w[j]!) / (vw * lambda) : NaN;
      }
      if (leverRates.length > 0) {
        if (differentiable) {
          // ∂λ/∂x_k = Σ_t s_t ∂a_t/∂x_k with s_ij = v_i w_j / ⟨v, w⟩.
          sens.fill(0);
          for (const p of partials) {
            const i = (p.cell / n) | 0;
            const j = p.cell - i * n;
            let d: number;
            try {
              d = p.fn(values);
            } catch (err) {
              if (!(err instanceof FormulaEvaluationError)) throw err;
              d = NaN; // the derivative does not exist at these values
            }
            sens[p.lever] = sens[p.lever]! + ((eig.v[i]! * eig.w[j]!) / vw) * d;
          }
          for (let k = 0; k < leverRates.length; k++) {
            const x = values[leverRates[k]!]!;
            out.rateElasticity[k] = x === 0 ? 0 : (x / lambda) * sens[k]!;
          }
        } else out.rateElasticity.fill(NaN);
      }
      const r0 = netReproductiveRate();
      out.r0 = r0;
      const t = Math.log(r0) / Math.log(lambda);
      out.generationTimeR0 = r0 > 0 && lambda > 0 && Math.abs(Math.log(lambda)) > 1e-12 && t > 0 && Number.isFinite(t) ? t : NaN;
      fw.fill(0);
      for (let i = 0; i < n; i++) {
        let s = 0;
        for (let j = 0; j < n; j++) s += f[i * n + j]! * eig.w[j]!;
        fw[i] = s;
      }
      let vfw = 0;
      for (let i = 0; i < n; i++) vfw += eig.v[i]! * fw[i]!;
      out.meanAgeOfParents = vfw > 0 && lambda > 0 ? (lambda * vw) / vfw : NaN;
      return out;
    },
  };
}
