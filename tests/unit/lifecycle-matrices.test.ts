import { describe, expect, it } from "vitest";
import {
  buildMatrices,
  compileLifeCycle,
  LifeCycleFormulaError,
  LifeCycleSchema,
  vitalRateSensitivities,
  type LifeCycle,
  type LifeCycleInput,
  type TransitionKind,
} from "../../shared/lifecycle";

// ---- small factories -------------------------------------------------------

const stage = (id: string, name = id) => ({ id, name, position: { x: 0, y: 0 } });
const rate = (name: string, value: number) => ({ id: `vr_${name}`, name, value });
const arrow = (id: string, from: string, to: string, kind: TransitionKind, r: number | string) => ({ id, from, to, kind, rate: r });

function lifeCycle(parts: Partial<LifeCycleInput>): LifeCycle {
  return LifeCycleSchema.parse({ stagewright: 2, name: "Test", census: "pre-breeding", timeStepUnit: "year", stages: [], rates: [], transitions: [], ...parts });
}

// The Leslie life table of METHODS.md §1 [derived; Caswell 2001 §2]:
// l(1)=0.5, l(2)=0.3, l(3)=0.1; m(1)=1, m(2)=3, m(3)=4.
const lifeTableRates = [rate("l1", 0.5), rate("l2", 0.3), rate("l3", 0.1), rate("m1", 1), rate("m2", 3), rate("m3", 4)];

/** Pre-breeding census: F_x = l(1)·m(x), P_x = l(x+1)/l(x). */
function preBreedingLeslie(): LifeCycle {
  return lifeCycle({
    census: "pre-breeding",
    stages: [stage("st_1", "Age 1"), stage("st_2", "Age 2"), stage("st_3", "Age 3")],
    rates: lifeTableRates,
    transitions: [
      arrow("tr_f1", "st_1", "st_1", "reproduction", "l1 * m1"),
      arrow("tr_f2", "st_2", "st_1", "reproduction", "l1 * m2"),
      arrow("tr_f3", "st_3", "st_1", "reproduction", "l1 * m3"),
      arrow("tr_p1", "st_1", "st_2", "growth", "l2 / l1"),
      arrow("tr_p2", "st_2", "st_3", "growth", "l3 / l2"),
    ],
  });
}

/** Post-breeding census (classes aged 0, 1, 2; l(0) = 1): F_x = [l(x+1)/l(x)]·m(x+1), P_x = l(x+1)/l(x). */
function postBreedingLeslie(): LifeCycle {
  return lifeCycle({
    census: "post-breeding",
    stages: [stage("st_0", "Age 0"), stage("st_1", "Age 1"), stage("st_2", "Age 2")],
    rates: lifeTableRates,
    transitions: [
      arrow("tr_f1", "st_0", "st_0", "reproduction", "l1 * m1"),
      arrow("tr_f2", "st_1", "st_0", "reproduction", "l2 / l1 * m2"),
      arrow("tr_f3", "st_2", "st_0", "reproduction", "l3 / l2 * m3"),
      arrow("tr_p1", "st_0", "st_1", "growth", "l1"),
      arrow("tr_p2", "st_1", "st_2", "growth", "l2 / l1"),
    ],
  });
}

/** A stage-classified life cycle whose rates use most of the formula language. */
function plantLifeCycle(): LifeCycle {
  return lifeCycle({
    stages: [stage("st_seed", "Seed"), stage("st_ros", "Rosette"), stage("st_fl", "Flowering")],
    rates: [rate("germ", 0.3), rate("s_r", 0.7), rate("g", 0.25), rate("b0", -0.4), rate("b1", 0.9), rate("size", 1.5), rate("seeds", 40), rate("est", 0.02), rate("s_f", 0.55)],
    transitions: [
      arrow("tr_ss", "st_seed", "st_seed", "stasis", "(1 - germ) * 0.5"),
      arrow("tr_sr", "st_seed", "st_ros", "growth", "germ * s_r"),
      arrow("tr_rr", "st_ros", "st_ros", "stasis", "s_r * (1 - g)"),
      arrow("tr_rf", "st_ros", "st_fl", "growth", "s_r * g"),
      arrow("tr_ff", "st_fl", "st_fl", "stasis", "min(0.95, s_f * exp(-0.1 * size))"),
      arrow("tr_fs", "st_fl", "st_seed", "reproduction", "invlogit(b0 + b1 * size) * seeds * est"),
      arrow("tr_fr", "st_fl", "st_ros", "reproduction", "sqrt(seeds) * est ^ 2"),
    ],
  });
}

// ---- a tiny local eigen-solver (tests only; the product's lives in shared/demography) ----

function multiply(A: number[][], x: number[]): number[] {
  return A.map((row) => row.reduce((s, a, j) => s + a * x[j]!, 0));
}
function transpose(A: number[][]): number[][] {
  return A[0]!.map((_, j) => A.map((row) => row[j]!));
}
/** Dominant eigenvalue and right eigenvector by power iteration (primitive matrices). */
function powerIteration(A: number[][]): { lambda: number; vector: number[] } {
  let x = A.map(() => 1 / A.length);
  let lambda = 0;
  for (let k = 0; k < 100_000; k++) {
    const y = multiply(A, x);
    const next = y.reduce((s, v) => s + v, 0);
    x = y.map((v) => v / next);
    if (Math.abs(next - lambda) <= 1e-15 * next && k > 10) return { lambda: next, vector: x };
    lambda = next;
  }
  return { lambda, vector: x };
}
/** λ and the sensitivity matrix s_ij = v_i w_j / ⟨v, w⟩ (Caswell 2001, ch. 9). */
function eigenSensitivity(A: number[][]): { lambda: number; S: number[][] } {
  const { lambda, vector: w } = powerIteration(A);
  const { vector: v } = powerIteration(transpose(A));
  const vw = v.reduce((s, vi, i) => s + vi * w[i]!, 0);
  return { lambda, S: v.map((vi) => w.map((wj) => (vi * wj) / vw)) };
}

function expectMatrixClose(actual: number[][], expected: number[][], tolerance = 1e-15) {
  expect(actual.length).toBe(expected.length);
  actual.forEach((row, i) => row.forEach((v, j) => expect(Math.abs(v - expected[i]![j]!), `(${i + 1}, ${j + 1}): ${v}`).toBeLessThanOrEqual(tolerance)));
}

// ---- tests ----------------------------------------------------------------

describe("buildMatrices on the Leslie life table of METHODS.md §1", () => {
  it("builds the pre-breeding matrix from l(x) and m(x) [derived, METHODS.md §1; Caswell 2001 §2]", () => {
    const m = buildMatrices(preBreedingLeslie());
    expect(m.errors).toEqual([]);
    expectMatrixClose(m.A, [
      [0.5, 1.5, 2.0],
      [0.6, 0, 0],
      [0, 1 / 3, 0],
    ]);
    expectMatrixClose(m.F, [
      [0.5, 1.5, 2.0],
      [0, 0, 0],
      [0, 0, 0],
    ]);
    expectMatrixClose(m.U, [
      [0, 0, 0],
      [0.6, 0, 0],
      [0, 1 / 3, 0],
    ]);
    expect(m.stageIds).toEqual(["st_1", "st_2", "st_3"]);
    expect(m.stageNames).toEqual(["Age 1", "Age 2", "Age 3"]);
  });

  it("builds the post-breeding matrix [derived, METHODS.md §1; Caswell 2001 §2]", () => {
    const m = buildMatrices(postBreedingLeslie());
    expect(m.errors).toEqual([]);
    expectMatrixClose(m.A, [
      [0.5, 1.8, 4 / 3],
      [0.5, 0, 0],
      [0, 0.6, 0],
    ]);
  });

  it("gives both censuses the same λ, the root of Euler–Lotka, and R0 = 1.8 [derived, METHODS.md §1]", () => {
    const pre = buildMatrices(preBreedingLeslie());
    const post = buildMatrices(postBreedingLeslie());
    const { lambda } = powerIteration(pre.A);
    expect(powerIteration(post.A).lambda).toBeCloseTo(lambda, 12);
    // Σ λ^(−x) l(x) m(x) = 1
    const lm = [0.5 * 1, 0.3 * 3, 0.1 * 4];
    expect(lm.reduce((s, v, x) => s + v * lambda ** -(x + 1), 0)).toBeCloseTo(1, 12);
    // R0 = Σ_j F_1j · (probability of reaching class j), from F and U of each matrix
    for (const { U, F } of [pre, post]) {
      let reach = 1;
      let R0 = 0;
      for (let j = 0; j < 3; j++) {
        R0 += F[0]![j]! * reach;
        reach *= U[j + 1]?.[j] ?? 0;
      }
      expect(R0).toBeCloseTo(1.8, 14);
    }
  });

  it("places an arrow from stage j to stage i at row i, column j", () => {
    const m = buildMatrices(preBreedingLeslie());
    expect(m.entries.find((e) => e.transitionId === "tr_p1")).toEqual({ transitionId: "tr_p1", kind: "growth", row: 1, col: 0, value: 0.6 });
    expect(m.entries.find((e) => e.transitionId === "tr_f3")).toMatchObject({ row: 0, col: 2, value: 2 });
    expect(m.entries.map((e) => e.transitionId)).toEqual(["tr_f1", "tr_f2", "tr_f3", "tr_p1", "tr_p2"]);
  });

  it("adds arrows that share a cell, keeping survival in U and reproduction in F", () => {
    const doc = lifeCycle({
      stages: [stage("st_j"), stage("st_a")],
      transitions: [
        arrow("tr_1", "st_j", "st_a", "growth", 0.3),
        arrow("tr_2", "st_a", "st_j", "shrinkage", 0.1),
        arrow("tr_3", "st_a", "st_j", "reproduction", 2),
        arrow("tr_4", "st_a", "st_a", "stasis", 0.8),
        arrow("tr_5", "st_a", "st_a", "reproduction", 0.05),
      ],
    });
    const m = buildMatrices(doc);
    expectMatrixClose(m.A, [
      [0, 2.1],
      [0.3, 0.85],
    ]);
    expectMatrixClose(m.U, [
      [0, 0.1],
      [0.3, 0.8],
    ]);
    expectMatrixClose(m.F, [
      [0, 2],
      [0, 0.05],
    ]);
  });

  it("builds empty matrices for a life cycle without stages", () => {
    expect(buildMatrices(lifeCycle({}))).toMatchObject({ A: [], U: [], F: [], entries: [], errors: [] });
  });
});

describe("vital-rate values", () => {
  it("overrides values by rate id", () => {
    const m = buildMatrices(preBreedingLeslie(), { vr_m2: 6, vr_l2: 0.4 });
    expect(m.A[0]![1]).toBe(3);
    expect(m.A[1]![0]).toBeCloseTo(0.8, 15);
    expect(m.A[2]![1]).toBeCloseTo(0.25, 15);
  });

  it("takes a full vector of values in document order", () => {
    const values = Float64Array.from([0.5, 0.3, 0.1, 1, 3, 8]);
    expect(buildMatrices(preBreedingLeslie(), values).A[0]![2]).toBe(4);
    expect(() => buildMatrices(preBreedingLeslie(), new Float64Array(5))).toThrow(/Expected 6 vital-rate values/);
    expect(() => buildMatrices(preBreedingLeslie(), Float64Array.from([0.5, 0.3, 0.1, 1, 3, Number.NaN]))).toThrow(/m3 must be a finite number/);
  });

  it("refuses an unknown id and points out a rate name used by mistake", () => {
    expect(() => buildMatrices(preBreedingLeslie(), { m2: 6 })).toThrow('No vital rate has the id "m2" ("m2" is a rate name; values are keyed by rate id, here "vr_m2").');
    expect(() => buildMatrices(preBreedingLeslie(), { vr_zz: 6 })).toThrow('No vital rate has the id "vr_zz".');
  });
});

describe("formula errors in matrices", () => {
  it("reports division by zero against its arrow and leaves the other entries intact", () => {
    const m = buildMatrices(preBreedingLeslie(), { vr_l1: 0 });
    expect(m.errors).toHaveLength(1);
    expect(m.errors[0]).toMatchObject({ transitionId: "tr_p1", code: "division-by-zero", formula: "l2 / l1" });
    expect(m.entries.find((e) => e.transitionId === "tr_p1")).toMatchObject({ value: Number.NaN, error: { code: "division-by-zero" } });
    expect(m.A[1]![0]).toBeNaN();
    expect(m.U[1]![0]).toBeNaN();
    expect(m.A[0]![0]).toBe(0); // l1 * m1 = 0
    expect(m.A[2]![1]).toBeCloseTo(1 / 3, 15);
  });

  it("reports a negative entry", () => {
    const m = buildMatrices(preBreedingLeslie(), { vr_m1: -1 });
    expect(m.errors[0]).toMatchObject({ transitionId: "tr_f1", code: "negative" });
    expect(m.entries[0]).toMatchObject({ value: -0.5 });
    expect(m.A[0]![0]).toBeNaN();
    expect(m.F[0]![0]).toBeNaN();
  });

  it("reports formulas that do not compile in a document that skipped validation", () => {
    const doc = { ...preBreedingLeslie() };
    doc.transitions = doc.transitions.map((t) => (t.id === "tr_p2" ? { ...t, rate: "l3 / l9" } : t));
    const m = buildMatrices(doc);
    expect(m.errors).toEqual([expect.objectContaining({ transitionId: "tr_p2", code: "unknown-rate", name: "l9", position: 5 })]);
    expect(() => compileLifeCycle(doc)).toThrow(LifeCycleFormulaError);
  });
});

describe("compileLifeCycle", () => {
  it("evaluates like buildMatrices, with and without values", () => {
    for (const doc of [preBreedingLeslie(), postBreedingLeslie(), plantLifeCycle()]) {
      const compiled = compileLifeCycle(doc);
      const { A, U, F } = buildMatrices(doc);
      expect(compiled.evaluate()).toEqual({ A, U, F });
      const values = compiled.values({ [doc.rates[1]!.id]: 0.2 });
      const changed = buildMatrices(doc, { [doc.rates[1]!.id]: 0.2 });
      expect(changed.A).not.toEqual(A);
      expect(compiled.evaluate(values)).toEqual({ A: changed.A, U: changed.U, F: changed.F });
    }
  });

  it("describes the rates and stages in order and returns each arrow's value", () => {
    const compiled = compileLifeCycle(preBreedingLeslie());
    expect(compiled.rateNames).toEqual(["l1", "l2", "l3", "m1", "m2", "m3"]);
    expect(compiled.rateIds[0]).toBe("vr_l1");
    expect(Array.from(compiled.baseValues)).toEqual([0.5, 0.3, 0.1, 1, 3, 4]);
    expect(Array.from(compiled.transitionValues())).toEqual([0.5, 1.5, 2, 0.3 / 0.5, 0.1 / 0.3]);
  });

  it("throws a LifeCycleFormulaError naming the arrow when a rate cannot be computed", () => {
    const compiled = compileLifeCycle(preBreedingLeslie());
    let caught: unknown;
    try {
      compiled.evaluate({ vr_l2: 0 });
    } catch (err) {
      caught = err;
    }
    expect(caught).toBeInstanceOf(LifeCycleFormulaError);
    expect((caught as LifeCycleFormulaError).errors[0]).toMatchObject({ transitionId: "tr_p2", code: "division-by-zero" });
  });

  it("is cheap enough for Monte Carlo: 20 000 evaluations well under a second", () => {
    const doc = plantLifeCycle();
    const compiled = compileLifeCycle(doc);
    const x = compiled.values();
    const start = performance.now();
    let sum = 0;
    for (let k = 0; k < 20_000; k++) {
      x[0] = 0.2 + (k % 100) / 1000;
      sum += compiled.evaluate(x).A[1]![0]!;
    }
    const elapsed = performance.now() - start;
    expect(sum).toBeGreaterThan(0);
    expect(elapsed).toBeLessThan(1000);
  });
});

describe("vitalRateSensitivities", () => {
  /** ∂λ/∂x by central differences of λ over the rate's value. */
  function finiteDifference(doc: LifeCycle, index: number): number {
    const compiled = compileLifeCycle(doc);
    const base = compiled.values();
    const h = 1e-6 * Math.max(1, Math.abs(base[index]!));
    const at = (delta: number) => {
      const x = Float64Array.from(base);
      x[index]! += delta;
      return powerIteration(compiled.evaluate(x).A).lambda;
    };
    return (at(h) - at(-h)) / (2 * h);
  }

  it.each([
    ["pre-breeding Leslie", preBreedingLeslie],
    ["post-breeding Leslie", postBreedingLeslie],
    ["stage-classified plant", plantLifeCycle],
  ] as const)("match central finite differences of λ (%s)", (_label, make) => {
    const doc = make();
    const { lambda, S } = eigenSensitivity(buildMatrices(doc).A);
    const result = vitalRateSensitivities(doc, S, lambda);
    expect(result.map((r) => r.name)).toEqual(doc.rates.map((r) => r.name));
    result.forEach((r, i) => {
      expect(r.error).toBeUndefined();
      expect(r.rateId).toBe(doc.rates[i]!.id);
      expect(r.value).toBe(doc.rates[i]!.value);
      const fd = finiteDifference(doc, i);
      expect(Math.abs(r.sensitivity - fd), `${r.name}: ${r.sensitivity} vs ${fd}`).toBeLessThan(1e-6 * Math.max(1, Math.abs(fd)));
      expect(r.elasticity).toBeCloseTo((r.value / lambda) * r.sensitivity, 14);
    });
  });

  it("gives elasticity 1 to a rate that scales the whole matrix (λ(kA) = kλ(A))", () => {
    const base = plantLifeCycle();
    const doc = lifeCycle({
      ...base,
      rates: [...base.rates, rate("k", 1.3)],
      transitions: base.transitions.map((t) => ({ ...t, rate: `k * (${t.rate})` })),
    });
    const { lambda, S } = eigenSensitivity(buildMatrices(doc).A);
    const k = vitalRateSensitivities(doc, S, lambda).find((r) => r.name === "k")!;
    expect(k.elasticity).toBeCloseTo(1, 10);
  });

  it("equals the matrix elasticity of the one entry a rate sets alone", () => {
    const doc = preBreedingLeslie();
    const { A } = buildMatrices(doc);
    const { lambda, S } = eigenSensitivity(A);
    // m3 only enters a_13 = l1·m3, so its elasticity is e_13 = a_13 s_13 / λ.
    const m3 = vitalRateSensitivities(doc, S, lambda).find((r) => r.name === "m3")!;
    expect(m3.elasticity).toBeCloseTo((A[0]![2]! * S[0]![2]!) / lambda, 14);
  });

  it("gives zero to rates no formula uses and ignores numeric arrows", () => {
    const doc = lifeCycle({
      stages: [stage("st_a")],
      rates: [rate("s", 0.5), rate("unused", 3)],
      transitions: [arrow("tr_1", "st_a", "st_a", "stasis", "s"), arrow("tr_2", "st_a", "st_a", "reproduction", 0.7)],
    });
    const [s, unused] = vitalRateSensitivities(doc, [[1]], 1.2);
    expect(s).toMatchObject({ name: "s", sensitivity: 1, elasticity: 0.5 / 1.2 });
    expect(unused).toMatchObject({ name: "unused", sensitivity: 0, elasticity: 0 });
  });

  it("marks a rate whose derivative has no finite value", () => {
    const doc = lifeCycle({
      stages: [stage("st_a")],
      rates: [rate("x", 0), rate("y", 0.5)],
      transitions: [arrow("tr_1", "st_a", "st_a", "stasis", "sqrt(x) + y")],
    });
    const [x, y] = vitalRateSensitivities(doc, [[1]], 0.5);
    expect(x!.sensitivity).toBeNaN();
    expect(x!.error).toMatchObject({ transitionId: "tr_1", code: "division-by-zero" });
    expect(y).toMatchObject({ sensitivity: 1, elasticity: 1 });
  });

  it("checks S and λ", () => {
    const doc = preBreedingLeslie();
    expect(() => vitalRateSensitivities(doc, [[1]], 1)).toThrow("The sensitivity matrix must be 3×3");
    const S = [
      [1, 0, 0],
      [0, 1, 0],
      [0, 0, 1],
    ];
    expect(() => vitalRateSensitivities(doc, S, 0)).toThrow("λ must be a positive finite number");
    expect(() => vitalRateSensitivities(doc, S, Number.NaN)).toThrow("λ must be a positive finite number");
  });
});
