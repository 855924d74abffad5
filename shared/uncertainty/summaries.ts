/**
 * Mergeable summaries of many draws, so Monte Carlo chunks can be computed
 * apart and combined in any worker.
 *
 * - Scalars (λ, R0, generation times) keep every draw (base64 of a
 *   Float64Array, NaN kept), so their percentiles are exact.
 * - Vectors (w, v, elasticities, one value per stage or lever per draw)
 *   keep a histogram on a signed log scale with LOG_BINS_PER_DECADE bins per
 *   decade of |x| from 10^LOG_MIN to 10^LOG_MAX (relative bin width 0.23 %),
 *   plus the exact sum, sum of squares, minimum and maximum. A percentile
 *   interpolates inside its bin, so it is within 0.23 % of the exact sample
 *   percentile; |x| below 10^LOG_MIN counts as 0.
 */

export const LOG_BINS_PER_DECADE = 1000;
export const LOG_MIN = -12;
export const LOG_MAX = 12;

/** A mergeable histogram of one quantity. */
export interface ItemHistogram {
  count: number;
  /** Draws where the quantity was not defined (NaN). */
  undefinedCount: number;
  sum: number;
  sumSquares: number;
  min: number;
  max: number;
  /** Counts of consecutive bins from bin `lo` (bin 0 is zero, ±k is sign · k-th log bin). */
  bins: { lo: number; counts: number[] };
}

export interface ItemSummary {
  mean: number;
  sd: number;
  lower: number;
  median: number;
  upper: number;
  /** Draws where the quantity was not defined. */
  undefinedCount: number;
}

export function emptyHistogram(): ItemHistogram {
  return { count: 0, undefinedCount: 0, sum: 0, sumSquares: 0, min: Infinity, max: -Infinity, bins: { lo: 0, counts: [] } };
}

const BIN_LIMIT = (LOG_MAX - LOG_MIN) * LOG_BINS_PER_DECADE;

function binOf(x: number): number {
  const a = Math.abs(x);
  if (a < 10 ** LOG_MIN) return 0;
  const k = Math.min(BIN_LIMIT, Math.floor((Math.log10(a) - LOG_MIN) * LOG_BINS_PER_DECADE) + 1);
  return x < 0 ? -k : k;
}

/** Lower and upper edge of a bin (in x), in increasing order. */
function binEdges(bin: number): [number, number] {
  if (bin === 0) return [0, 0];
  const k = Math.abs(bin);
  const lo = 10 ** (LOG_MIN + (k - 1) / LOG_BINS_PER_DECADE);
  const hi = 10 ** (LOG_MIN + k / LOG_BINS_PER_DECADE);
  return bin > 0 ? [lo, hi] : [-hi, -lo];
}

/** Accumulate one draw (mutates `h`; for a few values — a chunk uses HistogramAccumulator). */
export function addToHistogram(h: ItemHistogram, x: number): void {
  const acc = new HistogramAccumulator();
  acc.add(x);
  Object.assign(h, mergeHistograms([h, acc.toJSON()]));
}

/**
 * Fast accumulation of many draws of one quantity: counts in a window of
 * consecutive bins that grows as needed (one quantity's draws fill a narrow
 * band of bins); `toJSON` gives the mergeable histogram.
 */
export class HistogramAccumulator {
  private count = 0;
  private undefinedCount = 0;
  private sum = 0;
  private sumSquares = 0;
  private min = Infinity;
  private max = -Infinity;
  private lo = 0;
  private counts = new Float64Array(0);

  add(x: number): void {
    if (!Number.isFinite(x)) {
      this.undefinedCount++;
      return;
    }
    this.count++;
    this.sum += x;
    this.sumSquares += x * x;
    if (x < this.min) this.min = x;
    if (x > this.max) this.max = x;
    const b = binOf(x);
    let i = b - this.lo;
    if (i < 0 || i >= this.counts.length) i = this.grow(b);
    this.counts[i] = this.counts[i]! + 1;
  }

  /** Widens the window to hold bin b (with room to spare); returns b's index. */
  private grow(b: number): number {
    if (this.counts.length === 0) {
      this.lo = b - 64;
      this.counts = new Float64Array(129);
      return 64;
    }
    const hi = this.lo + this.counts.length - 1;
    const newLo = Math.min(this.lo, b - 64);
    const newHi = Math.max(hi, b + 64);
    const next = new Float64Array(newHi - newLo + 1);
    next.set(this.counts, this.lo - newLo);
    this.counts = next;
    this.lo = newLo;
    return b - newLo;
  }

  toJSON(): ItemHistogram {
    // Trim empty bins at both ends.
    let a = 0;
    let b = this.counts.length - 1;
    while (a <= b && this.counts[a] === 0) a++;
    while (b >= a && this.counts[b] === 0) b--;
    const bins = { lo: this.lo + a, counts: Array.from(this.counts.subarray(a, b + 1)) };
    return { count: this.count, undefinedCount: this.undefinedCount, sum: this.sum, sumSquares: this.sumSquares, min: this.min, max: this.max, bins };
  }
}

export function mergeHistograms(parts: readonly ItemHistogram[]): ItemHistogram {
  const out = emptyHistogram();
  const filled = parts.filter((p) => p.bins.counts.length > 0);
  const lo = Math.min(...filled.map((p) => p.bins.lo));
  const hi = Math.max(...filled.map((p) => p.bins.lo + p.bins.counts.length - 1));
  const counts = filled.length > 0 ? new Array<number>(hi - lo + 1).fill(0) : [];
  for (const p of parts) {
    out.count += p.count;
    out.undefinedCount += p.undefinedCount;
    out.sum += p.sum;
    out.sumSquares += p.sumSquares;
    out.min = Math.min(out.min, p.min ?? Infinity);
    out.max = Math.max(out.max, p.max ?? -Infinity);
    const off = p.bins.lo - lo;
    p.bins.counts.forEach((c, i) => (counts[off + i] = counts[off + i]! + c));
  }
  out.bins = { lo: filled.length > 0 ? lo : 0, counts };
  return out;
}

const sortedBins = (h: ItemHistogram): (readonly [number, number])[] => h.bins.counts.flatMap((c, i) => (c > 0 ? [[h.bins.lo + i, c] as const] : []));

/** The q-quantile (0 ≤ q ≤ 1) from a histogram, interpolated in its bin; NaN when empty. */
export function histogramQuantile(h: ItemHistogram, q: number, bins: readonly (readonly [number, number])[] = sortedBins(h)): number {
  if (h.count === 0) return NaN;
  const target = q * h.count;
  let seen = 0;
  for (const [bin, c] of bins) {
    if (seen + c >= target) {
      const [lo, hi] = binEdges(bin);
      const t = c > 0 ? (target - seen) / c : 0;
      const x = bin === 0 ? 0 : lo + t * (hi - lo);
      return Math.min(h.max, Math.max(h.min, x));
    }
    seen += c;
  }
  return h.max;
}

export function summarizeHistogram(h: ItemHistogram, level: number): ItemSummary {
  const mean = h.count > 0 ? h.sum / h.count : NaN;
  const variance = h.count > 1 ? Math.max(0, (h.sumSquares - h.count * mean * mean) / (h.count - 1)) : NaN;
  const bins = sortedBins(h);
  return {
    mean,
    sd: Math.sqrt(variance),
    lower: histogramQuantile(h, (1 - level) / 2, bins),
    median: histogramQuantile(h, 0.5, bins),
    upper: histogramQuantile(h, (1 + level) / 2, bins),
    undefinedCount: h.undefinedCount,
  };
}

/** Sample quantile of sorted finite values (linear interpolation between order statistics, "type 7"). */
export function sortedQuantile(sorted: Float64Array, q: number): number {
  const n = sorted.length;
  if (n === 0) return NaN;
  const h = (n - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(n - 1, lo + 1);
  return sorted[lo]! + (h - lo) * (sorted[hi]! - sorted[lo]!);
}

/** Exact summary of per-draw values (NaN counted as undefined). */
export function summarizeDraws(values: Float64Array, level: number): ItemSummary {
  const finite = values.filter((x) => Number.isFinite(x)).sort();
  const n = finite.length;
  let sum = 0;
  for (let i = 0; i < n; i++) sum += finite[i]!;
  const mean = n > 0 ? sum / n : NaN;
  let ss = 0;
  for (let i = 0; i < n; i++) ss += (finite[i]! - mean) ** 2;
  return {
    mean,
    sd: n > 1 ? Math.sqrt(ss / (n - 1)) : NaN,
    lower: sortedQuantile(finite, (1 - level) / 2),
    median: sortedQuantile(finite, 0.5),
    upper: sortedQuantile(finite, (1 + level) / 2),
    undefinedCount: values.length - n,
  };
}

/** Float64Array ⇄ base64, so a chunk's draws travel as compact JSON text (NaN kept). */
export function encodeFloat64(values: Float64Array): string {
  const bytes = new Uint8Array(values.buffer, values.byteOffset, values.byteLength);
  let binary = "";
  const STEP = 0x8000;
  for (let i = 0; i < bytes.length; i += STEP) binary += String.fromCharCode(...bytes.subarray(i, i + STEP));
  return btoa(binary);
}

export function decodeFloat64(text: string): Float64Array {
  const binary = atob(text);
  const bytes = new Uint8Array(binary.length);
  for (let i = 0; i < binary.length; i++) bytes[i] = binary.charCodeAt(i);
  return new Float64Array(bytes.buffer);
}
