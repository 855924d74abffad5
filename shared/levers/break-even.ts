/**
 * Break-even values of a life cycle: for each vital rate (and each non-zero
 * matrix entry), every value within the rate's allowed range at which λ
 * equals the target, with the others at baseline.
 */
import { breakEvenValues, exactLambda, type Crossing } from "../demography";
import type { Lever, LeverModel } from "./model";

export interface BreakEvenRow {
  readonly kind: "rate" | "entry";
  readonly key: string;
  readonly label: string;
  readonly value: number;
  /** The range searched (an open end is searched up to 1000 times the value's scale). */
  readonly lower: number;
  readonly upper: number;
  /** Whether each end is the lever's own bound (true) or where an open range was cut (false). */
  readonly lowerIsBound: boolean;
  readonly upperIsBound: boolean;
  readonly crossings: Crossing[];
  /** Change from the current value to each crossing, relative (null when the value is 0). */
  readonly relativeChanges: (number | null)[];
  /** Smallest and largest λ over the range. */
  readonly lambdaMin: { value: number; lambda: number } | null;
  readonly lambdaMax: { value: number; lambda: number } | null;
  /** Plain words: "not reachable: λ stays between 0.81 and 0.97 over [0, 1]". */
  readonly note: string | null;
}

export interface BreakEvenTable {
  readonly target: number;
  readonly lambda: number;
  readonly rows: BreakEvenRow[];
}

const short = (x: number) => Number(x.toPrecision(4)).toString();

/** λ along one lever, warm-started from the nearest point already computed. */
function lambdaAlong(model: LeverModel, lever: Lever): (x: number) => number {
  const { n } = model;
  const work = new Float64Array(n * n);
  const seen: { x: number; w: Float64Array }[] = [{ x: lever.value, w: model.w }];
  return (x: number) => {
    const ok = lever.kind === "rate" ? model.rateMatrixAt(lever.slot, x, work) : model.entryMatrixAt(lever.row, lever.col, x, work);
    if (!ok) return NaN;
    let near = seen[0]!;
    for (const s of seen) if (Math.abs(s.x - x) < Math.abs(near.x - x)) near = s;
    const r = exactLambda(work, n, near.w);
    if (seen.length < 256 && Number.isFinite(r.lambda) && r.lambda > 0) seen.push({ x, w: r.w });
    return r.lambda;
  };
}

/** Break-even values for the levers named by key (when none are named: every vital rate an arrow uses, or every non-zero entry of a life cycle without rates). */
export function breakEvenTable(model: LeverModel, options: { target?: number; keys?: readonly string[] } = {}): BreakEvenTable {
  const target = options.target ?? 1;
  if (!(target > 0) || !Number.isFinite(target)) throw new RangeError("The target λ is a number above 0.");
  const wanted = options.keys ? new Set(options.keys) : null;
  // Vital rates that some arrow uses; the matrix entries when the arrows are plain numbers (no rates to move).
  const rates = model.rates.filter((r) => r.arrows > 0);
  const all: Lever[] = wanted !== null ? [...rates, ...model.entries] : rates.length > 0 ? rates : model.entries;
  const levers = all.filter((l) => wanted === null || wanted.has(l.key));
  const rows = levers.map((lever): BreakEvenRow => {
    const result = breakEvenValues(lambdaAlong(model, lever), { value: lever.value, lower: lever.lower, upper: lever.upper, target });
    const range = `[${short(result.scanned.lower)}, ${short(result.scanned.upper)}]`;
    let note: string | null = null;
    if (result.crossings.length === 0) {
      note =
        result.lambdaMin && result.lambdaMax
          ? `Not reachable: λ stays between ${result.lambdaMin.lambda.toFixed(4)} and ${result.lambdaMax.lambda.toFixed(4)} over ${range}.`
          : `Not reachable: λ cannot be computed over ${range}.`;
    } else if (result.crossings.length > 1) {
      note = `λ crosses ${short(target)} ${result.crossings.length} times over ${range}: it does not move in one direction with this ${lever.kind === "rate" ? "rate" : "entry"}.`;
    }
    return {
      kind: lever.kind,
      key: lever.key,
      label: lever.label,
      value: lever.value,
      lower: result.scanned.lower,
      upper: result.scanned.upper,
      lowerIsBound: Number.isFinite(lever.lower),
      upperIsBound: Number.isFinite(lever.upper),
      crossings: result.crossings,
      relativeChanges: result.crossings.map((c) => (lever.value === 0 ? null : (c.value - lever.value) / Math.abs(lever.value))),
      lambdaMin: result.lambdaMin,
      lambdaMax: result.lambdaMax,
      note,
    };
  });
  return { target, lambda: model.lambda, rows };
}
