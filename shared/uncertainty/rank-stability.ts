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
}

export interface LeverStability {
  /** Share of ranked draws in which this lever ranks first (0–1). */
  rankFirst: number;
  /** Share of ranked draws in which it is among the top three. */
  topThree: number;
}

export function emptyRankCounts(items: number): RankCounts {
  return { draws: 0, skipped: 0, first: new Array<number>(items).fill(0), topThree: new Array<number>(items).fill(0) };
}

/** Rank one draw's elasticities by |e| (mutates `counts`): the top three by selection, and every lever's rank for the mean. */
export function recordRanks(counts: RankCounts, elasticity: ArrayLike<number>): void {
  const k = elasticity.length;
  if (k === 0) return;
  for (let i = 0; i < k; i++) {
    if (!Number.isFinite(elasticity[i]!)) {
      counts.skipped++;
      return;
    }
  }
  counts.draws++;
  // Top three in one pass (ties keep document order: only a strictly larger value moves ahead).
  let a = -1;
  let b = -1;
  let c = -1;
  const size = (i: number) => (i < 0 ? -1 : Math.abs(elasticity[i]!));
  for (let i = 0; i < k; i++) {
    const x = Math.abs(elasticity[i]!);
    if (x > size(a)) {
      c = b;
      b = a;
      a = i;
    } else if (x > size(b)) {
      c = b;
      b = i;
    } else if (x > size(c)) c = i;
  }
  counts.first[a]!++;
  counts.topThree[a]!++;
  if (b >= 0) counts.topThree[b]!++;
  if (c >= 0) counts.topThree[c]!++;
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
    }
  }
  return out;
}

export function rankStability(counts: RankCounts): LeverStability[] {
  const d = counts.draws;
  return counts.first.map((_, i) => ({
    rankFirst: d > 0 ? counts.first[i]! / d : NaN,
    topThree: d > 0 ? counts.topThree[i]! / d : NaN,
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
  const pick = (l: LeverStability | undefined) => (l ? { rankFirst: l.rankFirst, topThree: l.topThree } : undefined);
  return { draws: result.draws, rate: (id) => pick(rates.get(id)), entry: (from, to) => pick(entries.get(`${from}→${to}`)) };
}
