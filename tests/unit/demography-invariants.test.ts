// Invariants that hold for every non-negative primitive matrix (Caswell 2001,
// ch. 4 and 9), on seeded random matrices and with fast-check properties.
import { describe, expect, it } from "vitest";
import fc from "fast-check";
import { analyzeMatrix, dominantEigen } from "../../shared/demography";
import { leftMul, mul, randomPrimitive, seeded } from "./demography-fixtures";

const normInf = (A: number[][]): number => Math.max(...A.map((row) => row.reduce((s, a) => s + Math.abs(a), 0)));

describe("eigen-equations, elasticities and their sum on random matrices", () => {
  const rand = seeded(7);
  const mats = [2, 3, 5, 8, 13, 21, 30, 45, 80, 120].map((n) => randomPrimitive(n, rand));

  it("A w = λ w and vᵀA = λ vᵀ to 1e-12·‖A‖∞ (relative to the vector)", () => {
    for (const A of mats) {
      const r = analyzeMatrix({ A });
      const w = r.stableStage as number[];
      const v = r.reproductiveValue as number[];
      const scale = 1e-12 * normInf(A);
      mul(A, w).forEach((x, i) => expect(Math.abs(x - r.lambda * (w[i] as number))).toBeLessThanOrEqual(scale * Math.max(...w)));
      leftMul(v, A).forEach((x, i) => expect(Math.abs(x - r.lambda * (v[i] as number))).toBeLessThanOrEqual(scale * Math.max(...v)));
      expect(Math.abs(w.reduce((s, x) => s + x, 0) - 1)).toBeLessThanOrEqual(1e-14);
      expect(v[0]).toBe(1);
    }
  });

  it("elasticities sum to 1 (Caswell 2001 ch. 9) and balance per stage: Σ_j e_kj = Σ_i e_ik", () => {
    // Per-stage balance [derived]: Σ_j v_k a_kj w_j = λ v_k w_k = Σ_i v_i a_ik w_k.
    for (const A of mats) {
      const E = analyzeMatrix({ A }).elasticity as number[][];
      const total = E.flat().reduce((s, e) => s + e, 0);
      expect(Math.abs(total - 1)).toBeLessThanOrEqual(1e-13);
      E.forEach((row, k) => {
        const rowSum = row.reduce((s, e) => s + e, 0);
        const colSum = E.reduce((s, r) => s + (r[k] as number), 0);
        expect(Math.abs(rowSum - colSum)).toBeLessThanOrEqual(1e-13);
      });
    }
  });

  it("sensitivities equal central finite differences of λ, structural zeros included", () => {
    // Central difference with step h = 1e-6: truncation O(h²) and rounding
    // O(ε λ / h) are both below 1e-8, so the check is 1e-7 relative to max s_ij.
    const h = 1e-6;
    for (const A of mats.slice(0, 5)) {
      const r = analyzeMatrix({ A });
      const S = r.sensitivity as number[][];
      const sMax = Math.max(...S.flat());
      const n = A.length;
      for (let i = 0; i < n; i++) {
        for (let j = 0; j < n; j++) {
          const up = A.map((row) => [...row]);
          const down = A.map((row) => [...row]);
          (up[i] as number[])[j] = ((A[i] as number[])[j] as number) + h;
          (down[i] as number[])[j] = ((A[i] as number[])[j] as number) - h;
          const fd = (dominantEigen(up, { second: false }).lambda - dominantEigen(down, { second: false }).lambda) / (2 * h);
          expect(Math.abs(fd - ((S[i] as number[])[j] as number))).toBeLessThanOrEqual(1e-7 * sMax);
        }
      }
      // Structural zeros are flagged where a_ij = 0, and only there.
      r.structuralZero.forEach((row, i) => row.forEach((z, j) => expect(z).toBe((A[i] as number[])[j] === 0)));
    }
  });
});

describe("properties (fast-check) on random primitive matrices", () => {
  // A primitive matrix: random entries in [0, 2] on a random sparsity pattern,
  // plus a loop through every stage and a positive stasis entry at stage 1.
  const primitive = fc.integer({ min: 2, max: 12 }).chain((n) =>
    fc
      .array(fc.array(fc.oneof(fc.constant(0), fc.double({ min: 0.001, max: 2, noNaN: true })), { minLength: n, maxLength: n }), { minLength: n, maxLength: n })
      .map((rows) => {
        const A = rows.map((r) => [...r]);
        for (let i = 0; i < n; i++) (A[(i + 1) % n] as number[])[i] = Math.max((A[(i + 1) % n] as number[])[i] as number, 0.05);
        (A[0] as number[])[0] = Math.max((A[0] as number[])[0] as number, 0.05);
        return A;
      }),
  );

  it("λ lies between the smallest and largest column sums; w and v are positive; elasticities are non-negative", () => {
    // Frobenius bounds for a non-negative irreducible matrix (Caswell 2001 §4.5).
    fc.assert(
      fc.property(primitive, (A) => {
        const r = analyzeMatrix({ A });
        const colSums = A[0]?.map((_, j) => A.reduce((s, row) => s + (row[j] as number), 0)) as number[];
        const tol = 1e-12 * Math.max(...colSums);
        expect(r.lambda).toBeGreaterThanOrEqual(Math.min(...colSums) - tol);
        expect(r.lambda).toBeLessThanOrEqual(Math.max(...colSums) + tol);
        expect(Math.min(...(r.stableStage as number[]))).toBeGreaterThan(0);
        expect(Math.min(...(r.reproductiveValue as number[]))).toBeGreaterThan(0);
        expect(Math.min(...(r.elasticity as number[][]).flat())).toBeGreaterThanOrEqual(0);
        expect(r.structure.primitive).toBe(true);
        expect(r.isSound).toBe(true);
      }),
      { numRuns: 150, seed: 4242 },
    );
  });

  it("λ scales with A; w, v and elasticities do not change under scaling or diagonal similarity D⁻¹AD", () => {
    // λ(cA) = cλ(A); D⁻¹AD has the same λ, w ∝ D⁻¹w, v ∝ Dv, and the same elasticities
    // (e_ij = v_i a_ij w_j / (λ vᵀw) is invariant) [derived].
    fc.assert(
      fc.property(primitive, fc.double({ min: 0.01, max: 100, noNaN: true }), fc.array(fc.double({ min: 0.1, max: 10, noNaN: true }), { minLength: 12, maxLength: 12 }), (A, c, d) => {
        const n = A.length;
        const base = analyzeMatrix({ A });
        const scaled = analyzeMatrix({ A: A.map((row) => row.map((a) => c * a)) });
        expect(Math.abs(scaled.lambda - c * base.lambda)).toBeLessThanOrEqual(1e-12 * c * base.lambda);
        const similar = analyzeMatrix({ A: A.map((row, i) => row.map((a, j) => (a * (d[j] as number)) / (d[i] as number))) });
        expect(Math.abs(similar.lambda - base.lambda)).toBeLessThanOrEqual(1e-12 * base.lambda);
        const E0 = base.elasticity as number[][];
        for (const other of [scaled, similar]) {
          (other.elasticity as number[][]).forEach((row, i) => row.forEach((e, j) => expect(Math.abs(e - ((E0[i] as number[])[j] as number))).toBeLessThanOrEqual(1e-10)));
        }
        (scaled.stableStage as number[]).forEach((x, i) => expect(Math.abs(x - ((base.stableStage as number[])[i] as number))).toBeLessThanOrEqual(1e-12));
        // w of D⁻¹AD is D⁻¹w renormalised.
        const expected = (base.stableStage as number[]).map((x, i) => x / (d[i] as number));
        const total = expected.reduce((t, x) => t + x, 0);
        (similar.stableStage as number[]).slice(0, n).forEach((x, i) => expect(Math.abs(x - (expected[i] as number) / total)).toBeLessThanOrEqual(1e-10));
      }),
      { numRuns: 100, seed: 31337 },
    );
  });
});

describe("large matrices", () => {
  it("n = 500 converges with a certified λ: the Collatz–Wielandt bracket from w has width ≤ 1e-11·λ", () => {
    // For w > 0, min_i (Aw)_i/w_i ≤ λ ≤ max_i (Aw)_i/w_i (Collatz–Wielandt), so a
    // narrow bracket proves λ without any reference implementation.
    const A = randomPrimitive(500, seeded(500));
    const r = analyzeMatrix({ A });
    expect(r.converged).toBe(true);
    expect(r.method).toBe("restarted-arnoldi");
    const w = r.stableStage as number[];
    const ratios = mul(A, w).map((x, i) => x / (w[i] as number));
    expect(Math.min(...ratios)).toBeLessThanOrEqual(r.lambda * (1 + 1e-14));
    expect(Math.max(...ratios)).toBeGreaterThanOrEqual(r.lambda * (1 - 1e-14));
    expect(Math.max(...ratios) - Math.min(...ratios)).toBeLessThanOrEqual(1e-11 * r.lambda);
    expect(r.residual.right).toBeLessThanOrEqual(1e-12 * r.lambda);
    expect(r.residual.left).toBeLessThanOrEqual(1e-12 * r.lambda);
    expect(r.secondEigenvalue?.converged).toBe(true);
    expect(r.elasticity?.flat().reduce((s, e) => s + e, 0)).toBeCloseTo(1, 12);
  });

  it("a 400-class Leslie matrix fertile only in its last class (period 400) is solved exactly", () => {
    // λ⁴⁰⁰ = f · s³⁹⁹ for survival s in every class and fertility f in the last [derived].
    const n = 400;
    const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    for (let i = 1; i < n; i++) (A[i] as number[])[i - 1] = 0.95;
    (A[0] as number[])[n - 1] = 30;
    const r = analyzeMatrix({ A });
    const exact = Math.exp((Math.log(30) + (n - 1) * Math.log(0.95)) / n);
    expect(Math.abs(r.lambda - exact)).toBeLessThanOrEqual(1e-13 * exact);
    expect(r.converged).toBe(true);
    expect(r.structure.period).toBe(n);
    expect(r.dampingRatio).toBe(1);
    expect(r.period).toBeCloseTo(n, 9);
    // w_x ∝ (s/λ)^x [derived]
    const w = r.stableStage as number[];
    for (let x = 1; x < n; x += 37) expect(Math.abs((w[x] as number) / (w[x - 1] as number) - 0.95 / exact)).toBeLessThanOrEqual(1e-12);
  });
});
