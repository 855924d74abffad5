import { describe, expect, it } from "vitest";
import { ZodError } from "zod";
import {
  ageClassTemplate,
  buildMatrices,
  compileLifeCycle,
  lifeCycleFromMatrix,
  LifeCycleSchema,
  MAX_STAGES,
  stageTemplate,
  type LifeCycle,
} from "../../shared/lifecycle";

/** Deterministic ids for readable expectations. */
function counterIds() {
  const counts = new Map<string, number>();
  return (prefix: string) => {
    const n = (counts.get(prefix) ?? 0) + 1;
    counts.set(prefix, n);
    return `${prefix}_${n}`;
  };
}

/** The matrix with every vital rate set to its own value, so each cell shows which rate it holds. */
function matrixWithRateValues(doc: LifeCycle, valueOf: (name: string) => number): number[][] {
  const compiled = compileLifeCycle(doc);
  return compiled.evaluate(Float64Array.from(compiled.rateNames, valueOf)).A;
}

// P_x → 0.1·x, G_x → 0.01·x, F_x → 10·x
const code = (name: string) => ({ P: 0.1, G: 0.01, F: 10 })[name[0] as "P" | "G" | "F"] * Number(name.slice(1));

describe("ageClassTemplate", () => {
  it("has the Leslie structure: reproduction on the first row, survival below the diagonal", () => {
    const doc = ageClassTemplate(4, { newId: counterIds() });
    expect(doc.stages.map((s) => s.name)).toEqual(["Age class 1", "Age class 2", "Age class 3", "Age class 4"]);
    expect(matrixWithRateValues(doc, code)).toEqual([
      [10, 20, 30, 40],
      [0.1, 0, 0, 0],
      [0, 0.2, 0, 0],
      [0, 0, 0.30000000000000004, 0],
    ]);
    expect(buildMatrices(doc).F[0]).toEqual([0, 0, 0, 0]); // rates start at 0
    expect(doc.rates.every((r) => r.value === 0 && (r.notes ?? "").length > 0)).toBe(true);
  });

  it("adds stasis in the last class on request", () => {
    const doc = ageClassTemplate(3, { lastClassStasis: true });
    expect(doc.stages[2]!.name).toBe("Age class 3+");
    expect(matrixWithRateValues(doc, code)[2]).toEqual([0, 0.2, 0.30000000000000004]);
    expect(doc.transitions.find((t) => t.kind === "stasis")).toMatchObject({ from: doc.stages[2]!.id, to: doc.stages[2]!.id, rate: "P3" });
  });

  it("handles a single class and the options", () => {
    const doc = ageClassTemplate(1, { name: "Annual", census: "post-breeding", timeStepUnit: "season" });
    expect(doc).toMatchObject({ name: "Annual", census: "post-breeding", timeStepUnit: "season" });
    expect(doc.transitions).toEqual([expect.objectContaining({ kind: "reproduction", rate: "F1" })]);
    expect(doc.rates[0]!.notes).toContain("Post-breeding census");
  });

  it.each([0, 1.5, MAX_STAGES + 1, Number.NaN])("refuses %s classes", (k) => {
    expect(() => ageClassTemplate(k)).toThrow(RangeError);
  });
});

describe("stageTemplate", () => {
  it("has stasis and growth in each stage and reproduction from the last", () => {
    const doc = stageTemplate(3);
    expect(LifeCycleSchema.safeParse(doc).success).toBe(true);
    expect(doc.stages.map((s) => s.name)).toEqual(["Stage 1", "Stage 2", "Stage 3"]);
    expect(matrixWithRateValues(doc, code)).toEqual([
      [0.1, 0, 30],
      [0.01, 0.2, 0],
      [0, 0.02, 0.30000000000000004],
    ]);
    expect(new Set(doc.stages.map((s) => s.id)).size).toBe(3);
  });

  it("makes a single stage with stasis and reproduction", () => {
    expect(stageTemplate(1).transitions.map((t) => [t.kind, t.rate])).toEqual([
      ["stasis", "P1"],
      ["reproduction", "F1"],
    ]);
  });
});

// Teasel, Werner & Caswell 1977 as analysed in Caswell 2001 (METHODS.md §1); F = column 6.
const teasel = [
  [0, 0, 0, 0, 0, 322.38],
  [0.966, 0, 0, 0, 0, 0],
  [0.013, 0.01, 0.125, 0, 0, 3.448],
  [0.007, 0, 0.125, 0.238, 0, 30.17],
  [0.008, 0, 0.038, 0.245, 0.167, 0.862],
  [0, 0, 0, 0.023, 0.75, 0],
];
// Killer whale, Brault & Caswell 1993 (METHODS.md §1); F = row 1.
const killerWhale = [
  [0, 0.0043, 0.1132, 0],
  [0.9775, 0.9111, 0, 0],
  [0, 0.0736, 0.9534, 0],
  [0, 0, 0.0452, 0.9804],
];

describe("lifeCycleFromMatrix", () => {
  it("reproduces the matrix and its F from a reproduction matrix (teasel)", () => {
    const F = teasel.map((row) => row.map((v, j) => (j === 5 ? v : 0)));
    const names = ["Seed 1", "Seed 2", "Small", "Medium", "Large", "Flowering"];
    const doc = lifeCycleFromMatrix(teasel, names, { reproduction: F, name: "Teasel" });
    const m = buildMatrices(doc);
    expect(m.A).toEqual(teasel);
    expect(m.F).toEqual(F);
    expect(m.stageNames).toEqual(names);
    expect(doc.transitions).toHaveLength(teasel.flat().filter((v) => v > 0).length);
    expect(doc.rates).toEqual([]);
  });

  it("takes whole rows as reproduction (killer whale, F = row 1)", () => {
    const doc = lifeCycleFromMatrix(killerWhale, undefined, { reproductionRows: [0], newId: counterIds() });
    const m = buildMatrices(doc);
    expect(m.A).toEqual(killerWhale);
    expect(m.F).toEqual([killerWhale[0], [0, 0, 0, 0], [0, 0, 0, 0], [0, 0, 0, 0]]);
    expect(m.stageNames).toEqual(["Stage 1", "Stage 2", "Stage 3", "Stage 4"]);
    // a_12 = 0.0043: juveniles producing yearlings
    expect(doc.transitions.find((t) => t.from === "st_2" && t.to === "st_1")).toMatchObject({ kind: "reproduction", rate: 0.0043 });
  });

  it("treats nothing as reproduction unless told, naming kinds by position", () => {
    const doc = lifeCycleFromMatrix(killerWhale);
    expect(buildMatrices(doc).F.flat().every((v) => v === 0)).toBe(true);
    const kind = (from: number, to: number) => doc.transitions.find((t) => t.from === doc.stages[from]!.id && t.to === doc.stages[to]!.id)?.kind;
    expect(kind(1, 1)).toBe("stasis");
    expect(kind(0, 1)).toBe("growth");
    expect(kind(1, 0)).toBe("shrinkage");
  });

  it("splits a cell that is part survival, part reproduction", () => {
    const doc = lifeCycleFromMatrix([[0.9, 2], [0.3, 0.5]], ["J", "A"], { reproduction: [[0.4, 2], [0, 0]] });
    const m = buildMatrices(doc);
    expect(m.U[0]).toEqual([0.5, 0]);
    expect(m.F[0]).toEqual([0.4, 2]);
    expect(doc.transitions.filter((t) => t.from === doc.stages[0]!.id && t.to === doc.stages[0]!.id).map((t) => t.kind)).toEqual(["stasis", "reproduction"]);
  });

  it.each([
    [[], {}, "1 to 500 rows"],
    [[[0, 1]], {}, "Matrix row 1 has 2 entries"],
    [[[-1]], {}, "entries must be finite numbers ≥ 0"],
    [[[Number.NaN]], {}, "entries must be finite numbers ≥ 0"],
    [[[1]], { reproduction: [[2]] }, "F is part of A"],
    [[[1]], { reproduction: [[1]], reproductionRows: [0] }, "not both"],
    [[[1]], { reproductionRows: [1] }, "from 0 to 0"],
    [[[1, 0], [0, 1]], { reproduction: [[1]] }, "reproduction matrix has 1 rows"],
  ] as const)("refuses %j with %j", (matrix, options, message) => {
    expect(() => lifeCycleFromMatrix(matrix as unknown as number[][], undefined, options as never)).toThrow(message);
  });

  it("checks the stage names", () => {
    expect(() => lifeCycleFromMatrix([[1]], ["a", "b"])).toThrow("Give 1 stage names");
    expect(() => lifeCycleFromMatrix([[1, 0], [0, 1]], ["a", "a"])).toThrow(ZodError);
  });
});
