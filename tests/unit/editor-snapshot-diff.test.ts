import { describe, expect, it } from "vitest";
import { LifeCycleSchema, type LifeCycle } from "../../shared/lifecycle";
import { diffLifeCycles } from "../../src/features/history/snapshot-diff";

function lifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Marsh population",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [
      { id: "st_j", name: "Juvenile", position: { x: 0, y: 0 } },
      { id: "st_a", name: "Adult", position: { x: 200, y: 0 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.4, se: 0.05 },
      { id: "vr_sa", name: "s_a", value: 0.8 },
      { id: "vr_m", name: "m", value: 1.5 },
    ],
    transitions: [
      { id: "tr_1", from: "st_j", to: "st_a", kind: "growth", rate: "s_j" },
      { id: "tr_2", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
      { id: "tr_3", from: "st_a", to: "st_j", kind: "reproduction", rate: "s_j * m" },
    ],
    ...overrides,
  });
}

describe("diffLifeCycles", () => {
  it("finds nothing between a state and itself, and ignores diagram positions", () => {
    const doc = lifeCycle();
    expect(diffLifeCycles(doc, doc).empty).toBe(true);
    const moved = { ...doc, stages: doc.stages.map((s) => ({ ...s, position: { x: s.position.x + 50, y: 10 } })) };
    expect(diffLifeCycles(doc, moved).empty).toBe(true);
  });

  it("reports a changed rate with old and new values, and the matrix cells it moves", () => {
    const before = lifeCycle();
    const after = { ...before, rates: before.rates.map((r) => (r.id === "vr_sj" ? { ...r, value: 0.5, se: 0.04 } : r)) };
    const d = diffLifeCycles(before, after);
    expect(d.empty).toBe(false);
    expect(d.rates.changed).toHaveLength(1);
    expect(d.rates.changed[0]).toMatchObject({ name: "s_j", fields: ["value", "se"], before: { value: 0.4, se: 0.05 }, after: { value: 0.5, se: 0.04 } });
    // s_j feeds Juvenile → Adult (0.4 → 0.5) and Adult → Juvenile (0.6 → 0.75).
    expect(d.cells).toEqual([
      { to: "st_j", from: "st_a", toName: "Juvenile", fromName: "Adult", before: 0.4 * 1.5, after: 0.5 * 1.5 },
      { to: "st_a", from: "st_j", toName: "Adult", fromName: "Juvenile", before: 0.4, after: 0.5 },
    ]);
    expect(d.arrows).toEqual({ added: [], removed: [], changed: [] });
  });

  it("tells a renamed stage and a renamed rate from removals and additions", () => {
    const before = lifeCycle();
    const after = {
      ...before,
      stages: before.stages.map((s) => (s.id === "st_a" ? { ...s, name: "Breeder" } : s)),
      rates: before.rates.map((r) => (r.id === "vr_m" ? { ...r, name: "fec" } : r)),
      transitions: before.transitions.map((t) => (t.id === "tr_3" ? { ...t, rate: "s_j * fec" } : t)),
    };
    const d = diffLifeCycles(before, after);
    expect(d.stages).toEqual({ added: [], removed: [], renamed: [{ id: "st_a", before: "Adult", after: "Breeder" }], reordered: false });
    expect(d.rates.added).toEqual([]);
    expect(d.rates.removed).toEqual([]);
    expect(d.rates.changed.map((c) => [c.name, c.fields])).toEqual([["fec", ["name"]]]);
    expect(d.arrows.changed).toEqual([
      { id: "tr_3", fromName: "Breeder", toName: "Juvenile", before: { kind: "reproduction", rate: "s_j * m" }, after: { kind: "reproduction", rate: "s_j * fec" } },
    ]);
    // Same values: no matrix cell moved.
    expect(d.cells).toEqual([]);
  });

  it("lists added and removed stages, rates and arrows with the cells they bring or take", () => {
    const before = lifeCycle();
    const after = LifeCycleSchema.parse({
      ...before,
      stages: [...before.stages, { id: "st_o", name: "Old", position: { x: 400, y: 0 } }],
      rates: [...before.rates.filter((r) => r.id !== "vr_sa"), { id: "vr_so", name: "s_o", value: 0.3 }],
      transitions: [
        before.transitions[0]!,
        before.transitions[2]!,
        { id: "tr_4", from: "st_a", to: "st_o", kind: "growth", rate: "s_o" },
      ],
    });
    const d = diffLifeCycles(before, after);
    expect(d.stages.added.map((s) => s.name)).toEqual(["Old"]);
    expect(d.rates.added.map((r) => r.name)).toEqual(["s_o"]);
    expect(d.rates.removed.map((r) => r.name)).toEqual(["s_a"]);
    expect(d.arrows.added).toEqual([{ id: "tr_4", kind: "growth", fromName: "Adult", toName: "Old", rate: "s_o" }]);
    expect(d.arrows.removed).toEqual([{ id: "tr_2", kind: "stasis", fromName: "Adult", toName: "Adult", rate: "s_a" }]);
    expect(d.cells).toEqual([
      { to: "st_a", from: "st_a", toName: "Adult", fromName: "Adult", before: 0.8, after: 0 },
      { to: "st_o", from: "st_a", toName: "Old", fromName: "Adult", before: null, after: 0.3 },
    ]);
  });

  it("reports a removed stage by name and its cells as gone", () => {
    const before = lifeCycle();
    const after = LifeCycleSchema.parse({
      ...before,
      stages: [before.stages[1]!],
      transitions: [before.transitions[1]!],
    });
    const d = diffLifeCycles(before, after);
    expect(d.stages.removed.map((s) => s.name)).toEqual(["Juvenile"]);
    expect(d.arrows.removed.map((a) => `${a.fromName}→${a.toName}`)).toEqual(["Juvenile→Adult", "Adult→Juvenile"]);
    expect(d.cells.map((c) => [c.toName, c.fromName, c.before, c.after])).toEqual([
      ["Adult", "Juvenile", 0.4, null],
      ["Juvenile", "Adult", 0.4 * 1.5, null],
    ]);
  });

  it("notes settings that changed", () => {
    const before = lifeCycle();
    const d = diffLifeCycles(before, { ...before, census: "post-breeding", name: "Renamed" });
    expect(d.settings).toEqual([
      { field: "name", before: "Marsh population", after: "Renamed" },
      { field: "census", before: "pre-breeding", after: "post-breeding" },
    ]);
  });
});
