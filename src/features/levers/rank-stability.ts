/**
 * Rank stability beside the lever ranking: from the newest finished Monte
 * Carlo uncertainty Run of this life cycle, the share of draws in which each
 * lever ranks first by |elasticity| (shared/uncertainty rankStabilityLookup).
 */
import { rankStabilityLookup } from "../../../shared/uncertainty/rank-stability";
import { useRun, useRuns, type UncertaintyRun } from "../../api/runs";

export type RankStability = ReturnType<typeof rankStabilityLookup> & { version: number };

export function useRankStability(lifeCycleId: string): RankStability | null {
  const runs = useRuns(lifeCycleId);
  const latest = (runs.data ?? []).find((r) => r.kind === "uncertainty" && r.status === "succeeded") ?? null;
  const run = useRun(lifeCycleId, latest?.id ?? null).data as unknown as UncertaintyRun | undefined;
  if (!run?.result) return null;
  return { ...rankStabilityLookup(run.result), version: run.result.lifeCycleVersion };
}
