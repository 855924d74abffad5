/**
 * Stochastic replicates of the warming trajectory as a Run: each replicate
 * draws every year's temperature around the trajectory's mean with its
 * year-to-year SD and projects the saved life cycle through them. Progress
 * while the workers compute; then quantiles of N(t) against the projection
 * without noise, and the share of replicates below a threshold.
 */
import { lazy, Suspense, useState } from "react";
import { describeTrajectory } from "../../../shared/climate";
import type { WarmingTrajectory } from "../../../shared/lifecycle/thermal";
import { MAX_WARMING_REPLICATES } from "../../../shared/schemas/climate";
import { useStartWarmingRun, type WarmingRun } from "../../api/climate";
import { isActive, useRun, useRuns } from "../../api/runs";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Loading } from "../../components/ui/spinner";
import { formatNumber, formatPercent } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";

const TrajectoryChart = lazy(() => import("./charts").then((m) => ({ default: m.TrajectoryChart })));

export const CAUTIONS =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

export function WarmingRunSection({ lifeCycleId, trajectory, initialTotal, readOnly, saved }: { lifeCycleId: string; trajectory: WarmingTrajectory; initialTotal: number; readOnly: boolean; saved: boolean }) {
  const runs = useRuns(lifeCycleId);
  const start = useStartWarmingRun(lifeCycleId);
  const latest = (runs.data ?? []).find((r) => r.kind === "warming");
  const runId = start.data?.id ?? latest?.id ?? null;
  const run = useRun(lifeCycleId, runId).data as WarmingRun | undefined;
  const [replicatesText, setReplicatesText] = useState("500");
  const [thresholdText, setThresholdText] = useState("50");
  const replicates = parseNumberInput(replicatesText);
  const threshold = thresholdText.trim() === "" ? undefined : parseNumberInput(thresholdText);
  const replicatesOk = replicates !== null && Number.isInteger(replicates) && replicates >= 10 && replicates <= MAX_WARMING_REPLICATES;
  const thresholdOk = threshold === undefined || (threshold !== null && threshold >= 0);
  const sd = trajectory.sd ?? 0;
  const result = run?.status === "succeeded" ? run.result : null;

  return (
    <section className="space-y-3 border-t border-ink/15 pt-3" aria-labelledby="climate-replicates-heading">
      <h4 id="climate-replicates-heading" className="font-bold">
        Year-to-year variation: stochastic replicates (a Run)
      </h4>
      <p className="text-sm text-ink/80">
        Each replicate draws every year's temperature as the trajectory's mean plus normal noise with SD {formatNumber(sd, 3)} °C, and projects the saved life cycle through
        those years. {sd === 0 && "With an SD of 0 every replicate equals the projection above."}
      </p>
      {!readOnly && (
        <div className="flex flex-wrap items-end gap-3">
          <div>
            <label htmlFor="climate-replicates" className="block font-bold">
              Replicates
            </label>
            <input id="climate-replicates" inputMode="numeric" value={replicatesText} onChange={(e) => setReplicatesText(e.target.value)} className="w-28 rounded-md border border-ink/40 bg-white px-3 py-2" />
            {!replicatesOk && <p className="text-sm font-bold text-brick">✕ A whole number from 10 to {MAX_WARMING_REPLICATES}.</p>}
          </div>
          <div>
            <label htmlFor="climate-threshold" className="block font-bold">
              Quasi-extinction threshold (individuals)
            </label>
            <input id="climate-threshold" inputMode="decimal" value={thresholdText} onChange={(e) => setThresholdText(e.target.value)} className="w-28 rounded-md border border-ink/40 bg-white px-3 py-2" />
            {!thresholdOk && <p className="text-sm font-bold text-brick">✕ A number ≥ 0, or empty.</p>}
          </div>
          <Button
            disabled={!saved || !replicatesOk || !thresholdOk || start.isPending || (run !== undefined && isActive(run.status))}
            onClick={() => start.mutate({ trajectory, replicates: replicates!, initialTotal, ...(threshold !== undefined && threshold !== null ? { threshold } : {}) })}
          >
            Start replicates
          </Button>
          {!saved && <p className="text-sm text-ink/80">A Run uses the saved life cycle: wait until your changes are saved.</p>}
        </div>
      )}
      {start.error && (
        <Alert tone="error" title="The Run could not start">
          {start.error.message}
        </Alert>
      )}
      {run && isActive(run.status) && (
        <div className="space-y-1">
          <div role="progressbar" aria-label="Progress of the replicates" aria-valuemin={0} aria-valuemax={100} aria-valuenow={Math.round(run.progress * 100)} className="h-4 w-full overflow-hidden rounded-full border border-ink/30 bg-white">
            <div className="h-full bg-indigo" style={{ width: `${Math.max(2, Math.round(run.progress * 100))}%` }} />
          </div>
          <p className="text-sm">
            {run.status === "queued" ? "Waiting for a worker…" : `Computing: ${run.chunksDone} of ${run.chunksTotal} chunks done`}
          </p>
        </div>
      )}
      {run?.status === "failed" && (
        <Alert tone="error" title="The Run failed">
          {run.error}
        </Alert>
      )}
      {result && (
        <div className="space-y-2" data-testid="warming-result">
          <p>
            {result.replicates} replicates (seed {result.seed}, SD {formatNumber(result.sd, 3)} °C): in {formatPercent(result.shareEverBelowOne)} of them the annual λ falls below 1 at least once
            {result.medianFirstBelowIndex !== null && <>, by {result.years[result.medianFirstBelowIndex]} in half of them</>}.
            {result.belowThreshold && result.threshold !== null && (
              <>
                {" "}
                By {result.years[result.years.length - 1]! + 1}, {formatPercent(result.belowThreshold[result.belowThreshold.length - 1]!)} are below {formatNumber(result.threshold, 4)} individuals.
              </>
            )}
          </p>
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <TrajectoryChart
              years={result.years}
              total={result.deterministic.total}
              temperatures={result.meanTemperatures}
              firstYearBelowOne={result.deterministic.firstYearBelowOne}
              band={{ low: result.quantiles.find((q) => q.q === 0.05)!.values, median: result.quantiles.find((q) => q.q === 0.5)!.values, high: result.quantiles.find((q) => q.q === 0.95)!.values }}
              timeStepUnit={result.timeStepUnit}
              ariaLabel="Population size under warming: the projection without noise and the 5 %, median and 95 % of the replicates, above the mean temperature"
            />
          </Suspense>
          <p className="text-sm text-ink/80">
            This Run's temperatures: {describeTrajectory((run?.settings as { trajectory: WarmingTrajectory }).trajectory)}.
          </p>
        </div>
      )}
      <Alert tone="info" title="Cautions" live={false}>
        {CAUTIONS}
      </Alert>
    </section>
  );
}
