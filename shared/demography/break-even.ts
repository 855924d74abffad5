// Break-even values: where along one parameter's allowed range λ equals a
// target (1 by default: the population exactly replaces itself). λ is a
// function of one parameter with everything else held at baseline; it is
// recomputed exactly at every point. A rate used in several entries (s·g and
// s·(1−g)) can move λ non-monotonically, so the whole range is scanned and
// every crossing is refined and reported, not just the first.
import { brentRoot, goldenSection } from "./roots";

/** λ at a parameter value; NaN where the model is not defined. */
export type LambdaAt = (x: number) => number;

export interface BreakEvenOptions {
  /** The parameter's current value. */
  readonly value: number;
  /** Allowed range; an infinite end is scanned up to `span` times the scale of the value. */
  readonly lower: number;
  readonly upper: number;
  /** The λ wanted (default 1). */
  readonly target?: number;
  /** Points of the scan (default 96). */
  readonly gridPoints?: number;
  /** How far an infinite range is scanned, as a multiple of max(|value|, 1) (default 1000). */
  readonly span?: number;
}

export interface Crossing {
  /** Parameter value at which λ = target. */
  readonly value: number;
  /** λ there (equals the target to ~1e-12). */
  readonly lambda: number;
  /** λ rises through the target ("up") or falls through it ("down") as the parameter increases; "touch" when it only touches. */
  readonly direction: "up" | "down" | "touch";
}

export interface BreakEven {
  readonly target: number;
  /** Every value within the scanned range where λ = target, in increasing order. */
  readonly crossings: Crossing[];
  /** The range actually scanned (finite). */
  readonly scanned: { readonly lower: number; readonly upper: number };
  /** Smallest and largest λ seen over the scan, and where. */
  readonly lambdaMin: { readonly value: number; readonly lambda: number } | null;
  readonly lambdaMax: { readonly value: number; readonly lambda: number } | null;
  /** Part of the range where the model is not defined (a formula fails), if any was met. */
  readonly undefinedPoints: number;
}

/** The points of the scan over [lo, hi], denser near the current value when the range is wide. */
function scanPoints(opts: BreakEvenOptions, count: number): { points: number[]; lower: number; upper: number } {
  const x0 = opts.value;
  const scale = Math.max(Math.abs(x0), 1);
  const span = opts.span ?? 1000;
  const finiteLower = Number.isFinite(opts.lower);
  const finiteUpper = Number.isFinite(opts.upper);
  const lower = finiteLower ? opts.lower : x0 - span * scale;
  const upper = finiteUpper ? opts.upper : x0 + span * scale;
  const points = new Set<number>([lower, upper, Math.min(Math.max(x0, lower), upper)]);
  if (finiteLower && finiteUpper) {
    for (let k = 1; k < count - 1; k++) points.add(lower + ((upper - lower) * k) / (count - 1));
  } else {
    // Linear near the current value, geometric towards the far end(s).
    const half = Math.floor(count / 2);
    for (let k = 1; k < half; k++) points.add(lower + ((upper - lower) * k) / half);
    for (let k = 0; k < half; k++) {
      const step = scale * 10 ** (-3 + ((Math.log10(span) + 3) * k) / Math.max(half - 1, 1));
      if (x0 + step <= upper) points.add(x0 + step);
      if (x0 - step >= lower) points.add(x0 - step);
    }
  }
  return { points: [...points].sort((p, q) => p - q), lower, upper };
}

/** The point of [a, b] where |f| is smallest (golden-section search, f continuous there), stopping early at a sign change. */
function goldenMinAbs(f: (x: number) => number, a: number, b: number): { x: number; fx: number } {
  const signChange = (f1: number, f2: number) => Math.sign(f1) !== Math.sign(f2) && !Number.isNaN(f1) && !Number.isNaN(f2);
  return goldenSection(f, a, b, { xtol: 0, maxIterations: 60, score: (v) => -Math.abs(v), stop: signChange });
}

/**
 * Every value of one parameter (within its allowed range) at which λ equals
 * the target, by a scan of the exact λ followed by Brent refinement of each
 * sign change; dips and bumps between scan points that come close to the
 * target are searched too, so a λ curve that crosses twice between two scan
 * points is not missed. Values in parameter units; λ per projection interval.
 */
export function breakEvenValues(lambdaAt: LambdaAt, options: BreakEvenOptions): BreakEven {
  const target = options.target ?? 1;
  const { points, lower, upper } = scanPoints(options, Math.max(8, options.gridPoints ?? 96));
  const g = (x: number) => lambdaAt(x) - target;
  const gs = points.map(g);
  const ftol = 1e-13 * Math.max(1, Math.abs(target));
  const found: Crossing[] = [];
  let lambdaMin: BreakEven["lambdaMin"] = null;
  let lambdaMax: BreakEven["lambdaMax"] = null;
  let undefinedPoints = 0;
  points.forEach((x, k) => {
    const v = gs[k] as number;
    if (Number.isNaN(v)) {
      undefinedPoints += 1;
      return;
    }
    const lambda = v + target;
    if (lambdaMin === null || lambda < lambdaMin.lambda) lambdaMin = { value: x, lambda };
    if (lambdaMax === null || lambda > lambdaMax.lambda) lambdaMax = { value: x, lambda };
  });

  // Brent's method on a sign change whose end values are known; where λ is undefined inside, the best point so far.
  const refine = (a: number, b: number, fa: number, fb: number) => brentRoot(g, a, b, { fa, fb, ftol, xtol: 0, notFinite: "stop" }).x;

  const add = (x: number) => {
    const fx = g(x);
    const h = Math.max(Math.abs(x), 1) * 1e-7;
    const left = g(Math.max(lower, x - h));
    const right = g(Math.min(upper, x + h));
    const direction: Crossing["direction"] = right > left && right >= 0 && left <= 0 ? "up" : right < left && left >= 0 && right <= 0 ? "down" : "touch";
    if (!found.some((c) => Math.abs(c.value - x) <= 1e-9 * Math.max(Math.abs(x), 1))) found.push({ value: x, lambda: fx + target, direction });
  };

  for (let k = 0; k < points.length; k++) {
    const x = points[k] as number;
    const v = gs[k] as number;
    if (Number.isNaN(v)) continue;
    if (Math.abs(v) <= ftol) {
      add(x);
      continue;
    }
    if (k + 1 >= points.length) continue;
    const xn = points[k + 1] as number;
    const vn = gs[k + 1] as number;
    if (Number.isNaN(vn) || Math.abs(vn) <= ftol) continue;
    if (v * vn < 0) {
      add(refine(x, xn, v, vn));
      continue;
    }
    // Same sign at both ends: look for a dip towards the target inside the
    // two intervals around an interior point where |g| is smallest locally.
    if (k > 0) {
      const vp = gs[k - 1] as number;
      if (!Number.isNaN(vp) && vp * v > 0 && Math.abs(v) < Math.abs(vp) && Math.abs(v) <= Math.abs(vn)) {
        const xp = points[k - 1] as number;
        const m = goldenMinAbs(g, xp, xn);
        if (Number.isNaN(m.fx)) continue;
        if (Math.abs(m.fx) <= ftol) add(m.x);
        else if (m.fx * v < 0) {
          // Two crossings: one on each side of the point found.
          add(refine(xp, m.x, vp, m.fx));
          add(refine(m.x, xn, m.fx, vn));
        }
      }
    }
  }
  found.sort((p, q) => p.value - q.value);
  return { target, crossings: found, scanned: { lower, upper }, lambdaMin, lambdaMax, undefinedPoints };
}
