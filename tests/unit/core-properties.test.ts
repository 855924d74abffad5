// Property tests (fast-check) of the numerical core on random life cycles:
// documents with named vital rates and formulas, built into A = U + F and
// analysed, against the invariants METHODS.md states. Each check names where
// the invariant comes from.
import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { analyzeMatrix } from "../../shared/demography";
import { buildMatrices, LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, vitalRateSensitivities, type LifeCycle, type Transition } from "../../shared/lifecycle";

const RUNS = 120;

/**
 * A random stage-structured life cycle: stage j survives with s_j < 1 and
 * then stays, grows to j+1 (g_j) or, from stage 3 on, shrinks to j−1 (h_j);
 * a random non-empty set of stages reproduces into stage 1 with fecundity
 * f_j, some through a product formula. Column sums of U stay below 1.
 */
const lifeCycleArb: fc.Arbitrary<LifeCycle> = fc.integer({ min: 1, max: 8 }).chain((n) =>
  fc
    .record({
      s: fc.array(fc.double({ min: 0.05, max: 0.97, noNaN: true }), { minLength: n, maxLength: n }),
      g: fc.array(fc.double({ min: 0.05, max: 0.9, noNaN: true }), { minLength: n, maxLength: n }),
      h: fc.array(fc.double({ min: 0.005, max: 0.09, noNaN: true }), { minLength: n, maxLength: n }),
      f: fc.array(fc.double({ min: 0.05, max: 6, noNaN: true }), { minLength: n, maxLength: n }),
      breeds: fc.array(fc.boolean(), { minLength: n, maxLength: n }),
      census: fc.constantFrom("pre-breeding" as const, "post-breeding" as const),
    })
    .map(({ s, g, h, f, breeds, census }) => {
      // The oldest stage always breeds, so F is never empty.
      breeds[n - 1] = true;
      const stages = Array.from({ length: n }, (_, i) => ({ id: `st_${i + 1}`, name: `Stage ${i + 1}`, position: { x: 200 * i, y: 0 } }));
      const rates = [
        ...s.map((value, i) => ({ id: `vr_s${i + 1}`, name: `s_${i + 1}`, value })),
        ...g.map((value, i) => ({ id: `vr_g${i + 1}`, name: `g_${i + 1}`, value })),
        ...h.map((value, i) => ({ id: `vr_h${i + 1}`, name: `h_${i + 1}`, value })),
        ...f.map((value, i) => ({ id: `vr_f${i + 1}`, name: `f_${i + 1}`, value })),
      ];
      const transitions: Transition[] = [];
      for (let i = 1; i <= n; i++) {
        const grows = i < n;
        const shrinks = i >= 3;
        const stay = `s_${i} * (1${grows ? ` - g_${i}` : ""}${shrinks ? ` - h_${i}` : ""})`;
        transitions.push({ id: `tr_s${i}`, from: `st_${i}`, to: `st_${i}`, kind: "stasis", rate: stay });
        if (grows) transitions.push({ id: `tr_g${i}`, from: `st_${i}`, to: `st_${i + 1}`, kind: "growth", rate: `s_${i} * g_${i}` });
        if (shrinks) transitions.push({ id: `tr_h${i}`, from: `st_${i}`, to: `st_${i - 1}`, kind: "shrinkage", rate: `s_${i} * h_${i}` });
        if (breeds[i - 1]) transitions.push({ id: `tr_f${i}`, from: `st_${i}`, to: "st_1", kind: "reproduction", rate: i % 2 === 0 ? `f_${i} * s_${i}` : `f_${i}` });
      }
      return LifeCycleSchema.parse({ stagewright: LIFE_CYCLE_SCHEMA_VERSION, name: "Random", census, timeStepUnit: "year", stages, rates, transitions });
    }),
);

const matmul = (A: number[][], B: number[][]) => A.map((row) => B[0]!.map((_, j) => row.reduce((t, a, k) => t + a * B[k]![j]!, 0)));
const maxAbs = (xs: number[]) => Math.max(...xs.map(Math.abs));

describe("random life cycles", () => {
  it("A = U + F entry by entry; U keeps column sums below 1; F only where an arrow reproduces", () => {
    // DESIGN.md §2 / METHODS.md §0: A = U + F, U survival, F reproduction.
    fc.assert(
      fc.property(lifeCycleArb, (doc) => {
        const m = buildMatrices(doc);
        expect(m.errors).toEqual([]);
        const n = doc.stages.length;
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(m.A[i]![j]!).toBeCloseTo(m.U[i]![j]! + m.F[i]![j]!, 14);
        for (let j = 0; j < n; j++) expect(m.U.reduce((t, row) => t + row[j]!, 0)).toBeLessThan(1);
        const reproducing = new Set(doc.transitions.filter((t) => t.kind === "reproduction").map((t) => Number(t.from.slice(3)) - 1));
        for (let j = 0; j < n; j++) expect(m.F.some((row) => row[j]! > 0)).toBe(reproducing.has(j));
      }),
      { numRuns: RUNS, seed: 11 },
    );
  });

  it("eigen-equations hold, w is a distribution, elasticities sum to 1 (Caswell 2001 ch. 9)", () => {
    fc.assert(
      fc.property(lifeCycleArb, (doc) => {
        const { A } = buildMatrices(doc);
        const r = analyzeMatrix({ A });
        const w = r.stableStage!;
        expect(Math.abs(w.reduce((t, x) => t + x, 0) - 1)).toBeLessThan(1e-12);
        expect(Math.min(...w)).toBeGreaterThanOrEqual(0);
        const Aw = A.map((row) => row.reduce((t, a, j) => t + a * w[j]!, 0));
        expect(maxAbs(Aw.map((x, i) => x - r.lambda * w[i]!))).toBeLessThan(1e-10 * Math.max(1, r.lambda));
        const E = r.elasticity!;
        expect(Math.abs(E.flat().reduce((t, e) => t + e, 0) - 1)).toBeLessThan(1e-10);
      }),
      { numRuns: RUNS, seed: 12 },
    );
  });

  it("vital-rate sensitivities Σ s_ij ∂a_ij/∂x equal central finite differences of λ (METHODS.md §2)", () => {
    // h = 1e-6 relative: truncation O(h²) and rounding O(ε/h) both below 1e-6 of the scale.
    fc.assert(
      fc.property(lifeCycleArb, (doc) => {
        const base = analyzeMatrix({ A: buildMatrices(doc).A });
        const vr = vitalRateSensitivities(doc, base.sensitivity!, base.lambda);
        const scale = Math.max(...vr.map((v) => Math.abs(v.sensitivity)), 1e-3);
        for (const rate of doc.rates) {
          const h = 1e-6 * Math.max(rate.value as number, 1e-3);
          const at = (x: number) => analyzeMatrix({ A: buildMatrices({ ...doc, rates: doc.rates.map((r) => (r.id === rate.id ? { ...r, value: x } : r)) }).A }).lambda;
          const fd = (at((rate.value as number) + h) - at((rate.value as number) - h)) / (2 * h);
          const analytic = vr.find((v) => v.rateId === rate.id)!;
          expect(Math.abs(analytic.sensitivity - fd)).toBeLessThan(1e-5 * scale);
          expect(analytic.elasticity).toBeCloseTo(((rate.value as number) / base.lambda) * analytic.sensitivity, 12);
        }
      }),
      { numRuns: 40, seed: 13 },
    );
  });

  it("life history: (I − U)N = I, η = 1ᵀN, Var(η) ≥ 0, and λ − 1 and R0 − 1 share their sign (Cushing & Zhou 1994; Caswell 2001 §5.3)", () => {
    fc.assert(
      fc.property(lifeCycleArb, (doc) => {
        const { A, U, F } = buildMatrices(doc);
        const r = analyzeMatrix({ A, U, F });
        const lh = r.lifeHistory!;
        expect(lh).not.toBeNull();
        const n = A.length;
        const N = lh.fundamentalMatrix;
        const IminusU = U.map((row, i) => row.map((u, j) => (i === j ? 1 : 0) - u));
        const product = matmul(IminusU, N);
        for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) expect(Math.abs(product[i]![j]! - (i === j ? 1 : 0))).toBeLessThan(1e-9 * Math.max(1, ...N.flat()));
        lh.lifeExpectancy.forEach((eta, j) => expect(eta).toBeCloseTo(N.reduce((t, row) => t + row[j]!, 0), 9));
        lh.lifeExpectancyVariance.forEach((v, j) => expect(v).toBeGreaterThanOrEqual(-1e-9 * lh.lifeExpectancy[j]! ** 2));
        const R0 = lh.netReproductiveRate;
        if (Math.abs(r.lambda - 1) > 1e-9 && Math.abs(R0 - 1) > 1e-9) {
          expect(Math.sign(r.lambda - 1)).toBe(Math.sign(R0 - 1));
          // T_R0 = ln R0 / ln λ (METHODS.md §0).
          expect(lh.generationTimeR0).toBeCloseTo(Math.log(R0) / Math.log(r.lambda), 8);
        }
      }),
      { numRuns: RUNS, seed: 14 },
    );
  });

  it("the projection follows n(t+1) = A n(t), and raising every fecundity never lowers λ (Perron–Frobenius monotonicity)", () => {
    fc.assert(
      fc.property(lifeCycleArb, fc.double({ min: 1.01, max: 3, noNaN: true }), (doc, c) => {
        const { A } = buildMatrices(doc);
        const initial = A.map((_, i) => 10 + i);
        const r = analyzeMatrix({ A, initial, projectionSteps: 12 });
        const pop = r.projection!.population;
        for (let t = 1; t < pop.length; t++) {
          const next = A.map((row) => row.reduce((s, a, j) => s + a * pop[t - 1]![j]!, 0));
          next.forEach((x, i) => expect(Math.abs(x - pop[t]![i]!)).toBeLessThanOrEqual(1e-12 * Math.max(1, x)));
          expect(r.projection!.total[t]).toBeCloseTo(pop[t]!.reduce((s, x) => s + x, 0), 9);
        }
        const richer = { ...doc, rates: doc.rates.map((x) => (x.name.startsWith("f_") ? { ...x, value: (x.value as number) * c } : x)) };
        expect(analyzeMatrix({ A: buildMatrices(richer).A }).lambda).toBeGreaterThanOrEqual(r.lambda * (1 - 1e-12));
      }),
      { numRuns: RUNS, seed: 15 },
    );
  });
});

describe("random Leslie life tables", () => {
  // METHODS.md §1 [derived]: pre-breeding F_x = l(1) m(x), P_x = l(x+1)/l(x);
  // post-breeding F_x = [l(x+1)/l(x)] m(x+1), P_x = l(x+1)/l(x). Both give the
  // root of Σ λ^(−x) l(x) m(x) = 1 and R0 = Σ l(x) m(x).
  const tableArb = fc.integer({ min: 2, max: 7 }).chain((k) =>
    fc.record({
      p: fc.array(fc.double({ min: 0.1, max: 0.95, noNaN: true }), { minLength: k, maxLength: k }),
      m: fc.array(fc.double({ min: 0, max: 5, noNaN: true }), { minLength: k, maxLength: k }),
    }),
  );

  it("pre- and post-breeding matrices give the same λ, the Euler–Lotka root, and R0 = Σ l(x) m(x)", () => {
    fc.assert(
      fc.property(tableArb, ({ p, m }) => {
        const k = p.length;
        m[k - 1] = Math.max(m[k - 1]!, 0.5);
        // l(0) = 1, l(x) = Π p; ages 1..k.
        const l = [1];
        for (let x = 1; x <= k; x++) l.push(l[x - 1]! * p[x - 1]!);
        const mx = (x: number) => m[x - 1] ?? 0; // m(1..k)
        const pre = Array.from({ length: k }, () => new Array<number>(k).fill(0));
        const preF = Array.from({ length: k }, () => new Array<number>(k).fill(0));
        for (let x = 1; x <= k; x++) {
          pre[0]![x - 1] = preF[0]![x - 1] = l[1]! * mx(x);
          if (x < k) pre[x]![x - 1] = l[x + 1]! / l[x]!;
        }
        const post = Array.from({ length: k }, () => new Array<number>(k).fill(0));
        const postF = Array.from({ length: k }, () => new Array<number>(k).fill(0));
        // Post-breeding classes 0..k−1 (class x holds age x just after breeding).
        for (let x = 0; x < k; x++) {
          post[0]![x] = postF[0]![x] = (l[x + 1]! / l[x]!) * mx(x + 1);
          if (x < k - 1) post[x + 1]![x] = l[x + 1]! / l[x]!;
        }
        const U = (A: number[][], F: number[][]) => A.map((row, i) => row.map((a, j) => a - F[i]![j]!));
        const a = analyzeMatrix({ A: pre, U: U(pre, preF), F: preF });
        const b = analyzeMatrix({ A: post, U: U(post, postF), F: postF });
        const R0 = Array.from({ length: k }, (_, i) => l[i + 1]! * mx(i + 1)).reduce((s, x) => s + x, 0);
        if (R0 < 1e-6) return;
        expect(Math.abs(a.lambda - b.lambda)).toBeLessThan(1e-10 * a.lambda);
        const eulerLotka = Array.from({ length: k }, (_, i) => a.lambda ** -(i + 1) * l[i + 1]! * mx(i + 1)).reduce((s, x) => s + x, 0);
        expect(eulerLotka).toBeCloseTo(1, 9);
        expect(a.lifeHistory!.netReproductiveRate).toBeCloseTo(R0, 9);
        expect(b.lifeHistory!.netReproductiveRate).toBeCloseTo(R0, 9);
      }),
      { numRuns: RUNS, seed: 16 },
    );
  });
});
