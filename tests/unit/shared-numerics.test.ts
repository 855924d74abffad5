// The numerical helpers every area shares: the warm-started Perron solver,
// in-place LU solves, Brent's method and golden-section search, and the
// normal distribution with the Wilson interval. Each is checked against an
// independent route (the full eigen-analysis, the allocating solves, closed
// forms) rather than against itself.
import { describe, expect, it } from "vitest";
import { dominantEigenDense, perronFrom, PerronSolver } from "../../shared/demography/eigen";
import { luFactor, luFactorInPlace, luSolve, luSolveInPlace, luSolveTransposed, luSolveTransposedInPlace } from "../../shared/demography/lu";
import { matvec } from "../../shared/demography/matrix";
import { brentRoot, goldenSection } from "../../shared/demography/roots";
import { wilson } from "../../shared/fielddata";
import { normalCdf, normalQuantile, wilsonInterval, Z95 } from "../../shared/stats/normal";

/** A 4-stage matrix with fecundities f and survivals s (invented). */
function leslie(f: number, s: number): Float64Array {
  return Float64Array.of(0, f, 1.5 * f, 2 * f, s, 0, 0, 0, 0, s, 0, 0, 0, 0, s, 0.3);
}

describe("PerronSolver", () => {
  it("follows a sequence of nearby matrices, answering warm after the first call and agreeing with the full analysis", () => {
    const solver = new PerronSolver(4, { follow: true });
    for (let k = 0; k <= 40; k++) {
      const a = leslie(0.8 + 0.01 * k, 0.6);
      const r = solver.solve(a)!;
      const full = dominantEigenDense(a, 4, { second: false });
      expect(Math.abs(r.lambda - full.lambda)).toBeLessThan(1e-13);
      r.w.forEach((x, i) => expect(Math.abs(x - full.w[i]!)).toBeLessThan(1e-11));
      expect(r.warm).toBe(k > 0);
    }
    expect(solver.fallbacks).toBe(1);
  });

  it("gives v with the left option (Aᵀv = λv, v₁ = 1) and null instead of a fallback when asked", () => {
    const base = leslie(1, 0.7);
    const e0 = dominantEigenDense(base, 4, { second: false });
    const a = leslie(1.05, 0.68);
    const r = perronFrom(a, 4, e0, { left: true });
    const full = dominantEigenDense(a, 4, { second: false });
    expect(r.warm).toBe(true);
    expect(r.v![0]).toBe(1);
    r.v!.forEach((x, i) => expect(x / full.v[i]!).toBeCloseTo(1, 10));
    // Without a start there is nothing to refine, and without the fallback nothing answers.
    const strict = new PerronSolver(4, { left: true, fallback: false });
    expect(strict.solve(a, null)).toBeNull();
  });

  it("accepts a one-signed w with zeros (a stage nothing reaches) when λ and w only are asked", () => {
    // Stage 4 is entered by nothing, so w₄ = 0; its stasis 0.2 is below λ (common practice: a reducible matrix).
    const a = Float64Array.of(0, 1.2, 1.4, 0.5, 0.6, 0, 0, 0, 0, 0.7, 0.3, 0, 0, 0, 0, 0.2);
    const full = dominantEigenDense(a, 4, { second: false });
    const r = perronFrom(a, 4, { w: full.w });
    expect(r.warm).toBe(true);
    expect(Math.abs(r.lambda - full.lambda)).toBeLessThan(1e-13);
    expect(r.w[3]).toBeLessThan(1e-12);
  });
});

describe("in-place LU solves", () => {
  it("agree with the allocating solves and solve A x = b", () => {
    const n = 5;
    const a = Float64Array.from({ length: n * n }, (_, k) => Math.sin(k + 1) + (k % (n + 1) === 0 ? 3 : 0));
    const b = Float64Array.from({ length: n }, (_, i) => i - 2);
    const f = luFactor(a, n);
    const g = luFactorInPlace(Float64Array.from(a), n, new Int32Array(n));
    const x = Float64Array.from(b);
    luSolveInPlace(g, x, new Float64Array(n));
    expect(Array.from(x)).toEqual(Array.from(luSolve(f, b)));
    const y = Float64Array.from(b);
    luSolveTransposedInPlace(g, y, new Float64Array(n));
    expect(Array.from(y)).toEqual(Array.from(luSolveTransposed(f, b)));
    const ax = new Float64Array(n);
    matvec(a, n, x, ax);
    ax.forEach((v, i) => expect(v).toBeCloseTo(b[i]!, 12));
  });
});

describe("roots and golden-section search", () => {
  it("Brent's method uses the end values it is given and finds √2", () => {
    let calls = 0;
    const f = (x: number) => {
      calls++;
      return x * x - 2;
    };
    const root = brentRoot(f, 0, 2, { fa: -2, fb: 2, ftol: 0, xtol: 0 });
    expect(root.x).toBeCloseTo(Math.SQRT2, 14);
    expect(calls).toBe(root.iterations);
  });

  it("stops at the best point so far where f is undefined inside the bracket, or throws by default", () => {
    // f is known at both ends (given), undefined from 1 on: the first secant step lands there.
    const f = (x: number) => (x >= 1 ? NaN : x - 0.2);
    const r = brentRoot(f, 0, 3, { fa: -0.2, fb: 0.01, notFinite: "stop" });
    expect(r).toEqual({ x: 3, fx: 0.01, iterations: 1 });
    expect(() => brentRoot(f, 0, 3, { fa: -0.2, fb: 0.01 })).toThrow(/not finite/);
  });

  it("golden-section search maximises a score of f and reports f itself", () => {
    const m = goldenSection((x) => (x - 0.3) ** 2 - 0.04, 0, 0.5, { score: (v) => -Math.abs(v), xtol: 1e-12 });
    expect(m.x).toBeCloseTo(0.1, 6);
    expect(Math.abs(m.fx)).toBeLessThan(1e-9);
  });
});

describe("normal distribution and the Wilson interval", () => {
  it("Φ⁻¹ inverts Φ and Z95 is Φ⁻¹(0.975)", () => {
    for (const p of [1e-10, 0.001, 0.3, 0.5, 0.9, 0.975]) expect(normalCdf(normalQuantile(p)) / p).toBeCloseTo(1, 12);
    expect(normalQuantile(0.975)).toBeCloseTo(Z95, 13);
  });

  it("one Wilson interval: exactly 0 and 1 at the ends, [0, 1] without trials, the Field data form with its level", () => {
    expect(wilsonInterval(0, 20).lower).toBe(0);
    expect(wilsonInterval(20, 20).upper).toBe(1);
    expect(wilsonInterval(0, 0)).toEqual({ lower: 0, upper: 1 });
    expect(wilson(81, 263)).toEqual({ ...wilsonInterval(81, 263, normalQuantile(0.975)), level: 0.95 });
  });
});
