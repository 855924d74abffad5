import { describe, expect, it } from "vitest";
import { buildMatrices, LifeCycleSchema, type LifeCycle } from "../../shared/lifecycle";
import { availableKinds, defaultKind, replaceFormulaWithNumber, setArrowKind, setCellValue } from "../../src/features/matrix/matrix-edit";

function lifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Three stages",
    census: "post-breeding",
    timeStepUnit: "year",
    stages: [
      { id: "st_1", name: "Seedling", position: { x: 0, y: 0 } },
      { id: "st_2", name: "Juvenile", position: { x: 100, y: 0 } },
      { id: "st_3", name: "Adult", position: { x: 200, y: 0 } },
    ],
    rates: [{ id: "vr_s", name: "s", value: 0.6 }],
    transitions: [
      { id: "tr_g", from: "st_1", to: "st_2", kind: "growth", rate: 0.2 },
      { id: "tr_f", from: "st_3", to: "st_1", kind: "reproduction", rate: "s * 4" },
    ],
    ...overrides,
  });
}

function applied(result: ReturnType<typeof setCellValue>): LifeCycle {
  if ("error" in result) throw new Error(result.error);
  expect(LifeCycleSchema.safeParse(result.document).success).toBe(true);
  return result.document;
}

describe("matrix edits", () => {
  it("picks stasis on the diagonal, growth below it and shrinkage above it by stage order", () => {
    const doc = lifeCycle();
    expect(defaultKind(doc, "st_2", "st_2")).toBe("stasis");
    expect(defaultKind(doc, "st_3", "st_1")).toBe("growth");
    expect(defaultKind(doc, "st_1", "st_3")).toBe("shrinkage");
  });

  it("creates an arrow when a zero cell becomes non-zero, and the matrix shows it", () => {
    const doc = applied(setCellValue(lifeCycle(), "st_3", "st_2", 0.35));
    const added = doc.transitions.at(-1)!;
    expect(added).toMatchObject({ from: "st_2", to: "st_3", kind: "growth", rate: 0.35 });
    expect(buildMatrices(doc).A[2]![1]).toBe(0.35);
  });

  it("creates a reproduction arrow when asked, also on the diagonal", () => {
    const doc = applied(setCellValue(lifeCycle(), "st_3", "st_3", 1.5, "reproduction"));
    expect(doc.transitions.at(-1)).toMatchObject({ from: "st_3", to: "st_3", kind: "reproduction", rate: 1.5 });
    expect(buildMatrices(doc).F[2]![2]).toBe(1.5);
  });

  it("updates a numeric arrow and removes it when the cell becomes zero", () => {
    const updated = applied(setCellValue(lifeCycle(), "st_2", "st_1", 0.25));
    expect(updated.transitions.find((t) => t.id === "tr_g")!.rate).toBe(0.25);
    const removed = applied(setCellValue(updated, "st_2", "st_1", 0));
    expect(removed.transitions.some((t) => t.id === "tr_g")).toBe(false);
    expect(buildMatrices(removed).A[1]![0]).toBe(0);
  });

  it("never overwrites a formula by typing; replacing it is an explicit step", () => {
    const doc = lifeCycle();
    const typed = setCellValue(doc, "st_1", "st_3", 3);
    expect("error" in typed && typed.error).toMatch(/formula s \* 4/);
    const replaced = replaceFormulaWithNumber(doc, "tr_f", 2.4);
    expect(replaced.document.transitions.find((t) => t.id === "tr_f")!.rate).toBe(2.4);
    expect(replaced.label).toMatch(/Replace the formula/);
  });

  it("refuses negative entries and cells that add up several arrows", () => {
    const doc = lifeCycle();
    expect("error" in setCellValue(doc, "st_2", "st_1", -1)).toBe(true);
    const two = applied(setCellValue(doc, "st_2", "st_1", 0.2)); // unchanged growth
    const withBoth = LifeCycleSchema.parse({ ...two, transitions: [...two.transitions, { id: "tr_r", from: "st_1", to: "st_2", kind: "reproduction", rate: 0.1 }] });
    expect(setCellValue(withBoth, "st_2", "st_1", 0.5)).toEqual({ error: expect.stringMatching(/several arrows/) });
  });

  it("offers only the kinds a cell can still take", () => {
    const doc = lifeCycle();
    expect(availableKinds(doc, "st_2", "st_1")).toEqual(["reproduction"]);
    expect(availableKinds(doc, "st_1", "st_3")).toEqual(["shrinkage"]);
    expect(availableKinds(doc, "st_2", "st_2")).toEqual(["stasis", "reproduction"]);
    const switched = setArrowKind(doc, "tr_g", "reproduction").document;
    expect(LifeCycleSchema.safeParse(switched).success).toBe(true);
    expect(buildMatrices(switched).F[1]![0]).toBe(0.2);
  });
});
