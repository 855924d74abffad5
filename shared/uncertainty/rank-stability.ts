/**
 * Rank stability of levers: across Monte Carlo draws, how often each lever
 * (a vital rate or a non-zero matrix entry) ranks first, or in the top three,
 * when levers are ordered by |elasticity| — so a team sees whether its top
 * lever holds up against what it does not know. Ties keep document order.
 */

/** Mergeable counts of ranks over draws. */
export interface RankCounts {
  /** Draws in which every elasticity was defined (the ones ranked). */
  draws: number;
  /** Draws skipped because some elasticity was undefined. */
  skipped: number;
  first: number[];
  topThree: number[];
  /** Sum of 1-based ranks. */
  rankSum: number[];
}

export interface LeverStability {
  /** Share of ranked draws in which this lever ranks first (0–1). */
  rankFirst: number;
  /** Share of ranked draws in which it is among the top three. */
  topThree: number;
  /** Mean rank (1 = largest |elasticity|); NaN when no draw was ranked. */
  meanRank: number;
}

export function emptyRankCounts(items: number): RankCounts {
  return { draws: 0, skipped: 0, first: new Array<number>(items).fill(0), topThree: new Array<number>(items).fill(0), rankSum: new Array<number>(items).fill(0) };
}

const order: number[] = [];

/** Rank one draw's elasticities (mutates `counts`). */
export function recordRanks(counts: RankCounts, elasticity: ArrayLike<number>): void {
  const k = elasticity.length;
  if (k === 0) return;
  for (let i = 0; i < k; i++) {
    if (!Number.isFinite(elasticity[i]!)) {
      counts.skipped++;
      return;
    }
  }
  order.length = k;
  for (let i = 0; i < k; i++) order[i] = i;
  order.sort((a, b) => Math.abs(elasticity[b]!) - Math.abs(elasticity[a]!) || a - b);
  counts.draws++;
  for (let r = 0; r < k; r++) {
    const item = order[r]!;
    counts.rankSum[item]! += r + 1;
    if (r < 3) counts.topThree[item]!++;
  }
  counts.first[order[0]!]!++;
}

export function mergeRankCounts(parts: readonly RankCounts[]): RankCounts {
  const items = parts[0]?.first.length ?? 0;
  const out = emptyRankCounts(items);
  for (const p of parts) {
    out.draws += p.draws;
    out.skipped += p.skipped;
    for (let i = 0; i < items; i++) {
      out.first[i]! += p.first[i]!;
      out.topThree[i]! += p.topThree[i]!;
      out.rankSum[i]! += p.rankSum[i]!;
    }
  }
  return out;
}

export function rankStability(counts: RankCounts): LeverStability[] {
  const d = counts.draws;
  return counts.first.map((_, i) => ({
    rankFirst: d > 0 ? counts.first[i]! / d : NaN,
    topThree: d > 0 ? counts.topThree[i]! / d : NaN,
    meanRank: d > 0 ? counts.rankSum[i]! / d : NaN,
  }));
}

/** The part of a finished Monte Carlo result another area (Levers, the report) shows beside a ranking. */
export interface RankStabilitySource {
  draws: number;
  rateLevers: readonly ({ rateId: string } & LeverStability)[];
  entryLevers: readonly ({ from: string; to: string } & LeverStability)[];
}

/**
 * Rank stability keyed for lookup beside a lever table: rates by rate id,
 * matrix entries by `${from}→${to}` (stage ids). Levers absent from the run
 * (rates no formula uses, entries that were zero) are simply missing.
 */
export function rankStabilityLookup(result: RankStabilitySource): {
  draws: number;
  rate: (rateId: string) => LeverStability | undefined;
  entry: (from: string, to: string) => LeverStability | undefined;
} {
  const rates = new Map(result.rateLevers.map((l) => [l.rateId, l]));
  const entries = new Map(result.entryLevers.map((l) => [`${l.from}→${l.to}`, l]));
  const pick = (l: LeverStability | undefined) => (l ? { rankFirst: l.rankFirst, topThree: l.topThree, meanRank: l.meanRank } : undefined);
  return { draws: result.draws, rate: (id) => pick(rates.get(id)), entry: (from, to) => pick(entries.get(`${from}→${to}`)) };
}
