// Diagnostics, odd-but-sound matrices and invalid input. Odd matrices never
// throw: the affected fields are null with a reason. Invalid input throws a
// MatrixInputError with an exact, plain message.
import { describe, expect, it } from "vitest";
import { analyzeMatrix, diagnoseMatrix, MatrixInputError, MAX_STAGES, type MatrixAnalysis } from "../../shared/demography";

/** Every number in the result is finite and the object survives a JSON round trip unchanged. */
function expectJsonClean(r: MatrixAnalysis): void {
  const walk = (x: unknown): void => {
    if (typeof x === "number") expect(Number.isFinite(x)).toBe(true);
    else if (Array.isArray(x)) x.forEach(walk);
    else if (x !== null && typeof x === "object") Object.values(x).forEach(walk);
  };
  walk(r);
  expect(JSON.parse(JSON.stringify(r))).toEqual(r);
}

const codes = (r: { diagnostics: { code: string }[] }): string[] => r.diagnostics.map((d) => d.code);

describe("imprimitive: a Leslie matrix fertile only in its last age class", () => {
  // λ³ = 4 · 0.5 · 0.5 = 1, so λ = 1 and the other two eigenvalues are e^{±2πi/3} [derived].
  const A = [
    [0, 0, 4],
    [0.5, 0, 0],
    [0, 0.5, 0],
  ];
  const r = analyzeMatrix({ A, stageNames: ["age 1", "age 2", "age 3"] });

  it("is irreducible with period 3, damping ratio 1 and oscillation period 3", () => {
    expect(Math.abs(r.lambda - 1)).toBeLessThanOrEqual(1e-14);
    expect(r.structure).toMatchObject({ irreducible: true, primitive: false, period: 3 });
    expect(r.dampingRatio).toBe(1);
    expect(r.secondEigenvalue?.modulus).toBe(r.lambda);
    expect(Math.abs((r.secondEigenvalue?.re ?? 0) - Math.cos((2 * Math.PI) / 3) * r.lambda)).toBeLessThanOrEqual(1e-15);
    expect(Math.abs((r.period ?? 0) - 3)).toBeLessThanOrEqual(1e-12);
    expect(r.convergenceTime).toBeNull();
    expect(r.nullReasons.convergenceTime).toContain("never converges");
  });

  it("explains that the structure oscillates and never converges", () => {
    const d = r.diagnostics.find((x) => x.code === "imprimitive");
    expect(d?.severity).toBe("warning");
    expect(d?.message).toContain("oscillating with period 3 and never converges to the stable stage distribution; the damping ratio is 1");
    expect(d?.stages).toEqual([0, 1, 2]);
    expect(r.isSound).toBe(false);
    expectJsonClean(r);
  });
});

describe("reducible matrices", () => {
  it("a seed bank that nothing refills: w = 0 there, a warning names the stage", () => {
    // Stage 1 feeds the cycle {2, 3} but nothing enters it.
    const r = analyzeMatrix({
      A: [
        [0.3, 0, 0],
        [0.2, 0.5, 2],
        [0, 0.3, 0.8],
      ],
      stageNames: ["seed bank", "juvenile", "adult"],
    });
    expect(r.stableStage?.[0]).toBe(0);
    expect(r.structure.blocks.map((b) => b.stages)).toEqual([[0], [1, 2]]);
    expect(r.structure.dominantBlock).toBe(1);
    const d = r.diagnostics.find((x) => x.code === "reducible");
    expect(d?.severity).toBe("warning");
    expect(d?.message).toContain("Seed bank cannot be reached from that group, so it has no share in the stable stage distribution.");
    expect(r.isSound).toBe(false);
    expectJsonClean(r);
  });

  it("two separate groups with the same growth rate: λ repeated, w, v and sensitivities null with reasons", () => {
    const r = analyzeMatrix({
      A: [
        [1, 0],
        [0, 1],
      ],
    });
    expect(r.lambda).toBe(1);
    expect(codes(r)).toContain("shared-dominant-eigenvalue");
    expect(r.stableStage).toBeNull();
    expect(r.sensitivity).toBeNull();
    expect(r.elasticity).toBeNull();
    expect(r.dampingRatio).toBe(1);
    expect(r.nullReasons.stableStage).toContain("depends on the initial population");
    expect(r.nullReasons.sensitivity).toContain("repeated eigenvalue");
    expectJsonClean(r);
  });

  it("λ from long-lived post-breeders: warns that λ is not the breeding population's growth", () => {
    // Breeding block {1, 2}: λ² − 0.3λ − 0.6 = 0, λ ≈ 0.939 < 0.99 = a33 [derived].
    const U = [
      [0, 0, 0],
      [0.5, 0.3, 0],
      [0, 0.3, 0.99],
    ];
    const F = [
      [0, 1.2, 0],
      [0, 0, 0],
      [0, 0, 0],
    ];
    const A = U.map((row, i) => row.map((u, j) => u + (F[i]?.[j] as number)));
    const r = analyzeMatrix({ A, U, F, stageNames: ["young", "breeder", "post-breeder"] });
    expect(r.lambda).toBe(0.99);
    const d = r.diagnostics.find((x) => x.code === "dominant-block-not-reproducing");
    expect(d?.severity).toBe("warning");
    expect(d?.message).toContain("comes from post-breeder, a group in which no stage reproduces");
    expect(r.structure.blocks.find((b) => b.dominant)?.stages).toEqual([2]);
    expectJsonClean(r);
  });
});

describe("1×1, zero and loop-free matrices", () => {
  it("1×1: λ is the entry, no second eigenvalue, sound", () => {
    const r = analyzeMatrix({ A: [[1.2]], stageNames: ["adult"] });
    expect(r.lambda).toBe(1.2);
    expect(r.stableStage).toEqual([1]);
    expect(r.reproductiveValue).toEqual([1]);
    expect(r.sensitivity).toEqual([[1]]);
    expect(r.elasticity).toEqual([[1]]);
    expect(r.secondEigenvalue).toBeNull();
    expect(r.dampingRatio).toBeNull();
    expect(r.nullReasons.secondEigenvalue).toBe("A 1×1 matrix has a single eigenvalue.");
    expect(codes(r)).toEqual(["single-stage"]);
    expect(r.isSound).toBe(true);
    expectJsonClean(r);
  });

  it("zero matrix: λ = 0, an error diagnostic, nulls with reasons, no throw", () => {
    const r = analyzeMatrix({ A: [[0, 0], [0, 0]] });
    expect(r.lambda).toBe(0);
    expect(codes(r)).toEqual(["zero-matrix"]);
    expect(r.diagnostics[0]?.severity).toBe("error");
    expect(r.stableStage).toBeNull();
    expect(r.elasticity).toBeNull();
    expect(r.nullReasons.stableStage).toContain("every entry is zero");
    expect(r.isSound).toBe(false);
    expectJsonClean(r);
  });

  it("1×1 zero matrix", () => {
    const r = analyzeMatrix({ A: [[0]] });
    expect(r.lambda).toBe(0);
    expect(codes(r)).toEqual(["zero-matrix"]);
    expectJsonClean(r);
  });

  it("a life cycle with no loop is nilpotent: λ = 0 exactly", () => {
    const r = analyzeMatrix({ A: [[0, 0, 0], [0.5, 0, 0], [0, 0.5, 0]] });
    expect(r.lambda).toBe(0);
    expect(codes(r)).toEqual(["no-life-cycle-loop"]);
    expect(r.diagnostics[0]?.message).toContain("every cohort is gone within 3 steps");
    expectJsonClean(r);
  });
});

describe("checks on the entries and on U and F", () => {
  it("negative entries are errors naming the stages", () => {
    const r = analyzeMatrix({ A: [[0.2, 1.5], [0.5, -0.1]], stageNames: ["juvenile", "adult"] });
    const d = r.diagnostics.find((x) => x.code === "negative-entry");
    expect(d?.severity).toBe("error");
    expect(d?.message).toBe("A has a negative entry: the rate from adult to adult (row 2, column 2) is -0.1. Survival, growth and fertility rates cannot be negative.");
    expect(r.isSound).toBe(false);
  });

  it("survival above 1 out of a stage is an error (only when U is given)", () => {
    const U = [[0.2, 0], [0.9, 0.4]];
    const F = [[0, 2], [0, 0]];
    const A = [[0.2, 2], [0.9, 0.4]];
    const r = analyzeMatrix({ A, U, F, stageNames: ["juvenile", "adult"] });
    const d = r.diagnostics.find((x) => x.code === "survival-above-one");
    expect(d?.message).toBe("Survival out of juvenile (1.1) is above 1 (the column sum of U). A survival probability cannot exceed 1: more individuals would leave the stage alive than were in it.");
    expect(d?.stages).toEqual([0]);
    expect(codes(analyzeMatrix({ A }))).not.toContain("survival-above-one");
  });

  it("A that differs from U + F is an error", () => {
    const r = analyzeMatrix({ A: [[0.5, 2], [0.5, 0.5]], U: [[0, 0], [0.5, 0.5]], F: [[0, 2], [0, 0]] });
    const d = r.diagnostics.find((x) => x.code === "matrix-mismatch");
    expect(d?.message).toBe("A differs from U + F in one entry: the rate from stage 1 to stage 1 (row 1, column 1) is 0.5 in A but 0 in U + F.");
  });

  it("stages that reproduction can never reach, and stages that can never contribute to it", () => {
    // Stage 1 is a founder stage nothing produces; stage 4 is post-reproductive.
    const U = [
      [0, 0, 0, 0],
      [0.5, 0.4, 0, 0],
      [0, 0.3, 0.8, 0],
      [0, 0, 0.1, 0.7],
    ];
    const F = [
      [0, 0, 0, 0],
      [0, 0, 1.5, 0],
      [0, 0, 0, 0],
      [0, 0, 0, 0],
    ];
    const A = U.map((row, i) => row.map((u, j) => u + (F[i]?.[j] as number)));
    const r = analyzeMatrix({ A, U, F, stageNames: ["founder", "juvenile", "adult", "old"] });
    const unreached = r.diagnostics.find((x) => x.code === "unreachable-from-reproduction");
    expect(unreached?.stages).toEqual([0]);
    expect(unreached?.message).toBe("Founder can never be entered through reproduction and growth: this stage holds only the individuals present at the start and vanishes from the long-run population.");
    const barren = r.diagnostics.find((x) => x.code === "no-future-reproduction");
    expect(barren?.stages).toEqual([3]);
    expect(barren?.severity).toBe("info");
  });

  it("F without any positive entry is a warning", () => {
    const r = analyzeMatrix({ A: [[0.5, 0], [0.3, 0.9]], U: [[0.5, 0], [0.3, 0.9]], F: [[0, 0], [0, 0]] });
    expect(codes(r)).toContain("no-reproduction");
  });
});

describe("diagnoseMatrix on its own", () => {
  it("reports NaN and infinite entries instead of throwing", () => {
    const out = diagnoseMatrix({ A: [[0.5, Number.NaN], [0.2, Number.POSITIVE_INFINITY]], stageNames: ["a", "b"] });
    expect(out.isSound).toBe(false);
    expect(out.structure).toBeNull();
    expect(out.diagnostics[0]).toEqual({
      code: "non-finite-entry",
      severity: "error",
      message: "A has 2 entries that are not finite numbers (missing, NaN or infinite), for example the rate from b to a (row 1, column 2). Every rate must be a number before the model can be analysed.",
      stages: [0, 1],
    });
  });

  it("gives the same findings as analyzeMatrix on a sound matrix", () => {
    const A = [[0.2, 1.5], [0.5, 0.6]];
    const out = diagnoseMatrix({ A });
    expect(out.diagnostics).toEqual([]);
    expect(out.isSound).toBe(true);
    expect(out.structure).toEqual(analyzeMatrix({ A }).structure);
  });
});

describe("invalid input throws MatrixInputError with an exact message", () => {
  const thrown = (f: () => unknown): MatrixInputError => {
    try {
      f();
    } catch (e) {
      if (e instanceof MatrixInputError) return e;
      throw e;
    }
    throw new Error("did not throw");
  };

  it("non-square", () => {
    const e = thrown(() => analyzeMatrix({ A: [[1, 2, 3], [4, 5, 6]] }));
    expect(e.message).toBe("A is not square: it has 2 rows of 3 entries.");
    expect(e.field).toBe("A");
    expect(e.name).toBe("MatrixInputError");
  });

  it("ragged", () => {
    const e = thrown(() => analyzeMatrix({ A: [[1, 2], [3]] }));
    expect(e.message).toBe("A row 2 has 1 entry but row 1 has 2: every row must have the same length.");
    expect(e.path).toEqual(["A", 1]);
  });

  it("empty", () => {
    expect(thrown(() => analyzeMatrix({ A: [] })).message).toBe("A is empty: a projection matrix needs at least one stage.");
  });

  it("NaN, Infinity and non-numbers", () => {
    const e = thrown(() => analyzeMatrix({ A: [[1, Number.NaN], [0, 1]] }));
    expect(e.message).toBe("A row 1, column 2 is NaN; every entry must be a finite number.");
    expect(e.path).toEqual(["A", 0, 1]);
    expect(thrown(() => analyzeMatrix({ A: [[1, 0], [Number.NEGATIVE_INFINITY, 1]] })).message).toBe("A row 2, column 1 is -Infinity; every entry must be a finite number.");
    expect(thrown(() => analyzeMatrix({ A: [[1, "2" as unknown as number], [0, 1]] })).message).toBe("A row 1, column 2 is not a number (string); every entry must be a finite number.");
  });

  it("too many stages", () => {
    const big = Array.from({ length: MAX_STAGES + 1 }, () => new Array<number>(MAX_STAGES + 1).fill(0));
    expect(thrown(() => analyzeMatrix({ A: big })).message).toBe("A has 501 stages; at most 500 are supported.");
  });

  it("U, F, stage names and initial population that do not fit A", () => {
    expect(thrown(() => analyzeMatrix({ A: [[1, 0], [0, 1]], U: [[1]] })).message).toBe("U must be 2 × 2 like A, but it is 1 × 1.");
    expect(thrown(() => analyzeMatrix({ A: [[1, 0], [0, 1]], stageNames: ["a"] })).message).toBe("stageNames has 1 name but A has 2 stages.");
    expect(thrown(() => analyzeMatrix({ A: [[1, 0], [0, 1]], initial: [1, -2] })).message).toBe("initial entry 2 is negative (-2); numbers of individuals cannot be negative.");
    expect(thrown(() => analyzeMatrix({ A: [[1, 0], [0, 1]], initial: [0, 0] })).message).toBe("initial is all zeros: the initial population needs at least one individual.");
    expect(thrown(() => analyzeMatrix({ A: [[1]], projectionSteps: 0 })).message).toBe("projectionSteps must be a whole number from 1 to 10000.");
  });
});
