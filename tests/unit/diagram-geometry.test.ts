// Where the diagram's arrows run: border points, lanes for arrows that share
// two stages, bending around a stage in the way, loops, and the layout.
import { describe, expect, it } from "vitest";
import { emptyLifeCycle, type LifeCycle, type TransitionKind } from "../../shared/lifecycle";
import { layoutStages } from "../../src/features/diagram/auto-layout";
import { arrowGeometry, arrowLanes, borderPoint, segmentHitsRect, selfLoop, type Rect } from "../../src/features/diagram/geometry";

const box = (x: number, y: number, width = 100, height = 50): Rect => ({ x, y, width, height });
const arrow = (id: string, from: string, to: string, kind: TransitionKind = "growth") => ({ id, from, to, kind });

describe("borderPoint", () => {
  it("leaves the box through the side facing the target, a small gap outside", () => {
    const r = box(0, 0); // centre (50, 25)
    expect(borderPoint(r, { x: 500, y: 25 }, 0)).toEqual({ x: 100, y: 25 });
    expect(borderPoint(r, { x: 50, y: -300 }, 0)).toEqual({ x: 50, y: 0 });
    const p = borderPoint(r, { x: 500, y: 25 }, 3);
    expect(p.x).toBeCloseTo(103, 10);
  });
});

describe("segmentHitsRect", () => {
  const r = box(200, 0); // x 200..300, y 0..50
  it("sees a segment that runs through the box", () => {
    expect(segmentHitsRect({ x: 0, y: 25 }, { x: 500, y: 25 }, r)).toBe(true);
    expect(segmentHitsRect({ x: 250, y: -100 }, { x: 250, y: 200 }, r)).toBe(true);
    expect(segmentHitsRect({ x: 0, y: -100 }, { x: 500, y: 150 }, r)).toBe(true);
  });
  it("ignores segments that pass by or stop short", () => {
    expect(segmentHitsRect({ x: 0, y: 120 }, { x: 500, y: 120 }, r)).toBe(false);
    expect(segmentHitsRect({ x: 0, y: 25 }, { x: 150, y: 25 }, r)).toBe(false);
    expect(segmentHitsRect({ x: 500, y: 25 }, { x: 350, y: 25 }, r)).toBe(false);
    expect(segmentHitsRect({ x: 0, y: -200 }, { x: 100, y: 300 }, r)).toBe(false);
  });
});

describe("arrowLanes", () => {
  const rects = new Map([
    ["a", box(0, 0)],
    ["b", box(300, 0)],
    ["c", box(600, 0)],
    ["d", box(300, 400)],
  ]);

  it("draws a lone arrow straight and puts loops above (stasis) and below (reproduction)", () => {
    const lanes = arrowLanes([arrow("t1", "a", "d"), arrow("t2", "b", "b", "stasis"), arrow("t3", "b", "b", "reproduction")], rects);
    expect(lanes.get("t1")).toEqual({ loop: null, offset: 0, scaleWithLength: false });
    expect(lanes.get("t2")).toEqual({ loop: "top" });
    expect(lanes.get("t3")).toEqual({ loop: "bottom" });
  });

  it("separates arrows between the same two stages", () => {
    const lanes = arrowLanes([arrow("g", "a", "b"), arrow("r", "a", "b", "reproduction"), arrow("back", "b", "a", "shrinkage")], rects);
    const offsets = ["g", "r", "back"].map((id) => {
      const lane = lanes.get(id);
      if (!lane || lane.loop !== null) throw new Error(`no lane for ${id}`);
      return lane.offset;
    });
    // Each one bends to the right of its own direction, reproduction outside survival.
    expect(offsets[0]).toBeGreaterThan(0);
    expect(offsets[1]).toBeGreaterThan(offsets[0]!);
    expect(offsets[2]).toBeGreaterThan(0);
  });

  it("bends an arrow that would run straight through a third stage", () => {
    const lanes = arrowLanes([arrow("long", "c", "a", "reproduction"), arrow("short", "a", "b")], rects);
    expect(lanes.get("long")).toMatchObject({ scaleWithLength: true });
    expect(lanes.get("short")).toMatchObject({ scaleWithLength: false });
    const { path } = arrowGeometry(rects.get("c")!, rects.get("a")!, lanes.get("long")!);
    expect(path).toMatch(/^M[\d.,-]+ Q/);
    // The curve's control point lies well off the line y = 25 through the three stages.
    const control = /Q([\d.-]+),([\d.-]+)/.exec(path)!;
    expect(Math.abs(Number(control[2]) - 25)).toBeGreaterThan(100);
  });
});

describe("selfLoop", () => {
  it("puts the label on the loop's far side, above or below the stage", () => {
    const r = box(0, 100);
    expect(selfLoop(r, "top").label.y).toBeLessThan(100);
    expect(selfLoop(r, "bottom").label.y).toBeGreaterThan(150);
    expect(selfLoop(r, "top").label.x).toBeCloseTo(50, 10);
  });
});

describe("layoutStages", () => {
  it("orders stages by growth from left to right, shrinkage counted backwards", () => {
    const base = emptyLifeCycle("Layout");
    const doc: LifeCycle = {
      ...base,
      stages: ["s1", "s2", "s3"].map((id) => ({ id, name: id, position: { x: 0, y: 0 } })),
      transitions: [
        { id: "t1", from: "s2", to: "s3", kind: "growth", rate: 0.2 },
        { id: "t2", from: "s2", to: "s1", kind: "shrinkage", rate: 0.1 },
        { id: "t3", from: "s3", to: "s1", kind: "reproduction", rate: 2 },
      ],
    };
    const p = layoutStages(doc, new Map());
    expect(p.get("s1")!.x).toBeLessThan(p.get("s2")!.x);
    expect(p.get("s2")!.x).toBeLessThan(p.get("s3")!.x);
  });
});
