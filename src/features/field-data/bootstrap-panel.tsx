/**
 * The λ bootstrap of a stage-fate dataset as a background Run: settings,
 * Start, a progress bar while the worker computes chunks, Cancel, and the
 * percentile interval with the distribution of resampled λ.
 */
import { lazy, Suspense, useState } from "react";
import { type BootstrapRun, type DatasetSummary, type FateAnalysisSettings, isActive, useBootstrapRun, useCancelBootstrap, useDatasetRuns, useStartBootstrap } from "../../api/field-data";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { TextField } from "../../components/ui/field";
import { Section } from "../../components/ui/layout";
import { RelativeTime } from "../../components/ui/time";
import { formatLambda, formatNumber, formatPercent } from "../../lib/number-format";

const LambdaHistogram = lazy(() => import("./field-data-charts").then((m) => ({ default: m.LambdaHistogram })));

const STATUS: Record<BootstrapRun["status"], string> = { queued: "○ Waiting for a worker", running: "▶ Computing", succeeded: "✓ Finished", failed: "✕ Failed", cancelled: "■ Cancelled" };

function Progress({ run }: { run: BootstrapRun }) {
  const percent = Math.round(run.progress * 100);
  const text = `${run.chunksDone} of ${run.chunksTotal} chunks done (${percent} %)`;
  return (
    <div className="space-y-1">
      <div role="progressbar" aria-label="Progress of the bootstrap" aria-valuemin={0} aria-valuemax={100} aria-valuenow={percent} aria-valuetext={text} className="h-4 w-full overflow-hidden rounded-full border border-ink/30 bg-white">
        <div className="h-full bg-indigo transition-[width] duration-300" style={{ width: `${Math.max(percent, run.status === "running" ? 2 : 0)}%` }} />
      </div>
      <p className="text-sm tabular-nums">{text}</p>
    </div>
  );
}

function Result({ run }: { run: BootstrapRun }) {
  const r = run.result!;
  const level = `${Math.round(r.level * 100)} %`;
  return (
    <div className="space-y-3" data-testid="bootstrap-result">
      <p className="text-lg">
        λ = <strong className="tabular-nums">{formatLambda(r.lambda)}</strong>, {level} bootstrap interval{" "}
        <strong className="tabular-nums">
          {formatLambda(r.lower)}–{formatLambda(r.upper)}
        </strong>
      </p>
      <table className="text-sm">
        <caption className="sr-only">Bootstrap summary</caption>
        <tbody className="tabular-nums">
          <tr>
            <th scope="row" className="pr-3 text-left">Resamples</th>
            <td>{r.resamples.toLocaleString("en")} (seed {r.seed})</td>
          </tr>
          <tr>
            <th scope="row" className="pr-3 text-left">SD of resampled λ</th>
            <td>{formatNumber(r.sd, 3)}</td>
          </tr>
          <tr>
            <th scope="row" className="pr-3 text-left">Mean − estimate (bias)</th>
            <td>{formatNumber(r.bias, 3)}</td>
          </tr>
          <tr>
            <th scope="row" className="pr-3 text-left">Resamples with λ &lt; 1</th>
            <td>{formatPercent(r.shareBelowOne)}</td>
          </tr>
          <tr>
            <th scope="row" className="pr-3 text-left">Records per stage</th>
            <td>{r.stages.map((s, k) => `${s} ${r.recordsPerStage[k]}`).join(" · ")}</td>
          </tr>
          <tr>
            <th scope="row" className="pr-3 text-left">Settings</th>
            <td>
              {r.settings.census} census{r.settings.site ? `, ${r.settings.site}` : ", all sites"}
            </td>
          </tr>
        </tbody>
      </table>
      <Suspense fallback={null}>
        <LambdaHistogram bins={r.histogram} estimate={r.lambda} ariaLabel="Distribution of λ over the resamples" />
      </Suspense>
      <p className="text-sm text-ink/75">Percentile interval; records resampled with replacement within each stage, the matrix rebuilt each time. It reflects sampling error of these records, not year-to-year change in the environment.</p>
    </div>
  );
}

export function BootstrapPanel({ dataset, settings, canEdit }: { dataset: DatasetSummary; settings: FateAnalysisSettings; canEdit: boolean }) {
  const runs = useDatasetRuns(dataset.id);
  const [chosen, setChosen] = useState<string | null>(null);
  const runId = chosen ?? runs.data?.[0]?.id ?? null;
  const run = useBootstrapRun(dataset.id, runId);
  const start = useStartBootstrap(dataset.id);
  const cancel = useCancelBootstrap(dataset.id);
  const [resamples, setResamples] = useState("2000");
  const [seed, setSeed] = useState("");
  const n = Number(resamples);
  const nOk = Number.isInteger(n) && n >= 2000 && n <= 100_000;
  const seedOk = seed.trim() === "" || (Number.isInteger(Number(seed)) && Number(seed) >= 0);
  const r = run.data;

  return (
    <Section title="Bootstrap interval for λ" description="Runs in the background: records are resampled within each stage, with the census timing, offspring survival and site chosen above.">
      <div className="space-y-4">
        {canEdit && (
          <form
            className="flex flex-wrap items-end gap-3"
            onSubmit={(ev) => {
              ev.preventDefault();
              start.mutate({ analysis: settings, resamples: n, ...(seed.trim() ? { seed: Number(seed) } : {}) }, { onSuccess: (created) => setChosen(created.id) });
            }}
          >
            <TextField label="Resamples" inputMode="numeric" value={resamples} onChange={(e) => setResamples(e.target.value)} error={nOk ? undefined : "From 2,000 to 100,000."} />
            <TextField label="Seed (optional)" inputMode="numeric" value={seed} onChange={(e) => setSeed(e.target.value)} error={seedOk ? undefined : "A whole number ≥ 0."} />
            <Button type="submit" pending={start.isPending} disabled={!nOk || !seedOk}>
              Start the bootstrap
            </Button>
          </form>
        )}
        {start.error && <Alert tone="error">{start.error.message}</Alert>}
        {r && (
          <div className="space-y-3" data-run-status={r.status}>
            <p className="text-sm">
              <strong>{STATUS[r.status]}</strong> · started <RelativeTime iso={r.createdAt} />
              {r.createdBy && <> by {r.createdBy}</>}
            </p>
            {isActive(r.status) && (
              <>
                <Progress run={r} />
                {canEdit && (
                  <Button variant="secondary" size="sm" pending={cancel.isPending} onClick={() => cancel.mutate(r.id)}>
                    Cancel
                  </Button>
                )}
              </>
            )}
            {r.status === "failed" && <Alert tone="error">{r.error ?? "The Run failed."}</Alert>}
            {r.status === "succeeded" && r.result && <Result run={r} />}
          </div>
        )}
        {!r && runs.data?.length === 0 && <p className="text-sm text-ink/75">No bootstrap yet{canEdit ? "." : "; an editor can start one."}</p>}
        {(runs.data?.length ?? 0) > 1 && (
          <div>
            <h3 className="mb-1 font-bold">Earlier bootstraps</h3>
            <ul className="space-y-1 text-sm">
              {runs.data!.map((x) => (
                <li key={x.id}>
                  <button type="button" className="text-indigo underline" onClick={() => setChosen(x.id)} aria-current={x.id === runId ? "true" : undefined}>
                    {STATUS[x.status]} · <RelativeTime iso={x.createdAt} /> · {(x.settings as { resamples?: number }).resamples?.toLocaleString("en")} resamples
                  </button>
                </li>
              ))}
            </ul>
          </div>
        )}
      </div>
    </Section>
  );
}
