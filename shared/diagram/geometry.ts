/**
 * Where the diagram's arrows run. Pure functions of stage boxes, shared by
 * the on-screen arrows and the SVG/PNG export so both draw the same picture.
 *
 * Between two stages there can be up to four arrows (survival and
 * reproduction, each way); each gets a lane: a sideways offset of its
 * midpoint, to the right of its direction of travel. Self-loops sit above
 * the stage (stasis) or below it (reproduction back into the same stage).
 */
import type { Transition } from "../lifecycle";

export interface Point {
  x: number;
  y: number;
}

/** A stage's box on the canvas: top-left corner and size. */
export interface Rect {
  x: number;
  y: number;
  width: number;
  height: number;
}

export type Lane = { loop: "top" | "bottom" } | { loop: null; offset: number; scaleWithLength: boolean };

export interface ArrowGeometry {
  path: string;
  /** Where the label sits: on the arrow, half way. */
  label: Point;
  /** Points whose bounding box holds the whole path (its ends and turning points, or control points for loops). */
  hull: Point[];
}

/** Size assumed for a stage box before it has been measured on screen. */
export const DEFAULT_STAGE_SIZE = { width: 168, height: 64 };
/** Sideways distance between arrows that share two stages. */
const SPREAD = 26;
/** Bend of a lone arrow that would otherwise run straight through another stage, as a share of its length. */
const CROSSING_BEND = 0.22;
const LOOP_HEIGHT = 58;
/** Gap between an arrow's tip and the stage's edge. */
const GAP = 3;

export const center = (r: Rect): Point => ({ x: r.x + r.width / 2, y: r.y + r.height / 2 });

/** The point where the ray from the box's centre towards `toward` leaves the box, pushed out by `gap`. */
export function borderPoint(r: Rect, toward: Point, gap = GAP): Point {
  const c = center(r);
  const dx = toward.x - c.x;
  const dy = toward.y - c.y;
  if (dx === 0 && dy === 0) return c;
  const hw = r.width / 2 + gap;
  const hh = r.height / 2 + gap;
  const scale = 1 / Math.max(Math.abs(dx) / hw, Math.abs(dy) / hh);
  return { x: c.x + dx * scale, y: c.y + dy * scale };
}

const round = (v: number) => Math.round(v * 10) / 10;
const pt = (p: Point) => `${round(p.x)},${round(p.y)}`;

/** Where a quadratic curve turns in x or in y (the points, besides its ends, that bound it). */
function quadraticExtremes(p0: Point, p1: Point, p2: Point): Point[] {
  const at = (t: number): Point => ({
    x: (1 - t) * (1 - t) * p0.x + 2 * (1 - t) * t * p1.x + t * t * p2.x,
    y: (1 - t) * (1 - t) * p0.y + 2 * (1 - t) * t * p1.y + t * t * p2.y,
  });
  const points: Point[] = [];
  for (const axis of ["x", "y"] as const) {
    const den = p0[axis] - 2 * p1[axis] + p2[axis];
    if (den === 0) continue;
    const t = (p0[axis] - p1[axis]) / den;
    if (t > 0 && t < 1) points.push(at(t));
  }
  return points;
}

/** An arrow from one stage to another, straight or bent by its lane. */
export function arrowBetween(source: Rect, target: Rect, offset: number, scaleWithLength: boolean): ArrowGeometry {
  const a = center(source);
  const b = center(target);
  const dx = b.x - a.x;
  const dy = b.y - a.y;
  const length = Math.hypot(dx, dy) || 1;
  const bend = scaleWithLength ? Math.sign(offset || 1) * Math.max(Math.abs(offset), CROSSING_BEND * length) : offset;
  if (bend === 0) {
    const start = borderPoint(source, b);
    const end = borderPoint(target, a);
    return { path: `M${pt(start)} L${pt(end)}`, label: { x: (start.x + end.x) / 2, y: (start.y + end.y) / 2 }, hull: [start, end] };
  }
  // Right of the direction of travel, in screen coordinates (y grows downwards).
  const normal = { x: -dy / length, y: dx / length };
  // A quadratic curve passes its control point's half-way mark: double the offset.
  const control = { x: (a.x + b.x) / 2 + normal.x * bend * 2, y: (a.y + b.y) / 2 + normal.y * bend * 2 };
  const start = borderPoint(source, control);
  const end = borderPoint(target, control);
  const label = { x: 0.25 * start.x + 0.5 * control.x + 0.25 * end.x, y: 0.25 * start.y + 0.5 * control.y + 0.25 * end.y };
  return { path: `M${pt(start)} Q${pt(control)} ${pt(end)}`, label, hull: [start, end, ...quadraticExtremes(start, control, end)] };
}

/** A self-loop on the top (stasis) or bottom (reproduction) of a stage. */
export function selfLoop(r: Rect, side: "top" | "bottom"): ArrowGeometry {
  const c = center(r);
  const spread = Math.min(r.width * 0.22, 34);
  const sign = side === "top" ? -1 : 1;
  const edge = side === "top" ? r.y - GAP : r.y + r.height + GAP;
  // Leave on the left, come back on the right (clockwise seen from above).
  const start = { x: c.x - spread, y: edge };
  const end = { x: c.x + spread, y: edge };
  const c1 = { x: c.x - spread - 30, y: edge + sign * LOOP_HEIGHT * 1.33 };
  const c2 = { x: c.x + spread + 30, y: edge + sign * LOOP_HEIGHT * 1.33 };
  // A cubic curve's half-way point: (p0 + 3·c1 + 3·c2 + p3) / 8.
  const label = { x: c.x, y: edge + sign * LOOP_HEIGHT };
  const hull = [start, c1, c2, end];
  return side === "top"
    ? { path: `M${pt(start)} C${pt(c1)} ${pt(c2)} ${pt(end)}`, label, hull }
    : { path: `M${pt(end)} C${pt(c2)} ${pt(c1)} ${pt(start)}`, label, hull };
}

export function arrowGeometry(source: Rect, target: Rect, lane: Lane): ArrowGeometry {
  if (lane.loop !== null) return selfLoop(source, lane.loop);
  return arrowBetween(source, target, lane.offset, lane.scaleWithLength);
}

/** Does the segment from p to q pass through the box (grown by `pad`)? Liang–Barsky clipping. */
export function segmentHitsRect(p: Point, q: Point, r: Rect, pad = 6): boolean {
  const x0 = r.x - pad;
  const x1 = r.x + r.width + pad;
  const y0 = r.y - pad;
  const y1 = r.y + r.height + pad;
  const dx = q.x - p.x;
  const dy = q.y - p.y;
  let t0 = 0;
  let t1 = 1;
  // One boundary: the segment is inside where den·t ≤ num.
  const clip = (den: number, num: number): boolean => {
    if (den === 0) return num >= 0;
    const t = num / den;
    if (den < 0) {
      if (t > t1) return false;
      if (t > t0) t0 = t;
    } else {
      if (t < t0) return false;
      if (t < t1) t1 = t;
    }
    return true;
  };
  return clip(-dx, p.x - x0) && clip(dx, x1 - p.x) && clip(-dy, p.y - y0) && clip(dy, y1 - p.y) && t0 <= t1;
}

const isSurvival = (t: Pick<Transition, "kind">) => t.kind !== "reproduction";

/**
 * A lane for every arrow. `rects` (by stage id) lets a lone straight arrow
 * that would run through a third stage bend around it instead.
 */
export function arrowLanes(transitions: readonly Pick<Transition, "id" | "from" | "to" | "kind">[], rects: ReadonlyMap<string, Rect>): Map<string, Lane> {
  const lanes = new Map<string, Lane>();
  const byDirection = new Map<string, Pick<Transition, "id" | "from" | "to" | "kind">[]>();
  for (const t of transitions) {
    if (t.from === t.to) {
      lanes.set(t.id, { loop: t.kind === "reproduction" ? "bottom" : "top" });
      continue;
    }
    const key = `${t.from}\u0000${t.to}`;
    const list = byDirection.get(key);
    if (list) list.push(t);
    else byDirection.set(key, [t]);
  }
  for (const [key, list] of byDirection) {
    const [from, to] = key.split("\u0000") as [string, string];
    const hasReverse = byDirection.has(`${to}\u0000${from}`);
    // Survival first (closest to the straight line), reproduction outside it.
    const ordered = [...list].sort((p, q) => Number(isSurvival(q)) - Number(isSurvival(p)));
    const n = ordered.length;
    ordered.forEach((t, k) => {
      let offset: number;
      if (hasReverse) offset = SPREAD * (k + 1);
      else if (n === 1) offset = 0;
      else offset = (k - (n - 1) / 2) * 2 * SPREAD;
      let scaleWithLength = false;
      const a = rects.get(from);
      const b = rects.get(to);
      if (a && b && (offset === 0 || t.kind === "reproduction")) {
        const p = center(a);
        const q = center(b);
        for (const [id, r] of rects) {
          if (id !== from && id !== to && segmentHitsRect(p, q, r)) {
            scaleWithLength = true;
            break;
          }
        }
      }
      lanes.set(t.id, { loop: null, offset, scaleWithLength });
    });
  }
  return lanes;
}
