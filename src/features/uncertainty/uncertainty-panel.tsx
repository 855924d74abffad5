/**
 * Uncertainty: a Monte Carlo Run that draws the vital rates many times from
 * their uncertainty (SE, CI, counts or distribution, with correlations) and
 * reports percentile intervals of λ, R0, the generation times, w, v and the
 * elasticities, P(λ < 1), a histogram of λ, and how stable the ranking of
 * levers is. The delta method on the Results tab is the instant version; this
 * checks it and adds what a first-order formula cannot give.
 */
import { lazy, Suspense, useState, type FormEvent } from "react";
import { uncertaintyModel } from "../../../shared/uncertainty";
import type { LifeCycle } from "../../../shared/lifecycle";
import { DEFAULT_DRAWS, MAX_DRAWS, MIN_DRAWS } from "../../../shared/schemas/uncertainty";
import { isApiError } from "../../api/client";
import { isActive, useCancelRun, useRun, useRuns, useStartUncertaintyRun, type RunSummary, type UncertaintyRun } from "../../api/runs";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { ErrorBoundary } from "../../components/ui/error-boundary";
import { QueryError } from "../../components/ui/query-error";
import { Loading, Spinner } from "../../components/ui/spinner";
import { RelativeTime } from "../../components/ui/time";
import type { AnalysisState } from "../../lib/editor-types";
import { UncertaintyResults } from "./uncertainty-results";

const CAUTIONS =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

export interface UncertaintyPanelProps {
  lifeCycleId: string;
  document: LifeCycle;
  analysis: AnalysisState;
  readOnly: boolean;
  saveStatus: "saved" | "unsaved" | "saving" | "invalid" | "failed" | "conflict";
  version: number;
}

const STATUS_WORDS: Record<RunSummary["status"], string> = {
  queued: "○ Waiting for a worker",
  running: "▶ Computing",
  succeeded: "✓ Finished",
  failed: "✕ Failed",
  cancelled: "■ Cancelled",
};

function blockedReason(p: UncertaintyPanelProps): string | null {
  if (p.document.stages.length === 0) return "Add stages and arrows on the Diagram tab first.";
  if (p.saveStatus === "unsaved" || p.saveStatus === "saving") return "Saving your latest changes… A Run uses the saved life cycle, so it can start once they are saved.";
  if (p.saveStatus !== "saved") return "Your latest changes are not saved (see the header). A Run uses the saved life cycle: fix that first.";
  return null;
}

export function UncertaintyPanel(props: UncertaintyPanelProps) {
  const { lifeCycleId, document: doc, readOnly, version } = props;
  const runs = useRuns(lifeCycleId);
  const list = (runs.data ?? []).filter((r) => r.kind === "uncertainty");
  const [picked, setPicked] = useState<string | null>(null);
  const shownId = picked ?? list[0]?.id ?? null;
  const model = uncertaintyModel(doc);

  return (
    <section aria-labelledby="uncertainty-heading" className="space-y-5">
      <div className="space-y-2">
        <h2 id="uncertainty-heading" className="text-xl font-bold">
          Uncertainty
        </h2>
        <p className="max-w-4xl text-ink/85">
          How sure are we that the population is declining, and that the top lever really is the best one? A Run draws every uncertain vital rate many times from what the Rates
          tab says about it, recomputes the life cycle for each draw, and shows how much the results move. The Results tab gives the quick first-order version of the same
          intervals.
        </p>
        <Alert tone="info" live={false}>
          <p>{CAUTIONS}</p>
        </Alert>
      </div>

      <div className="grid gap-5 lg:grid-cols-2">
        <div className="min-w-0 space-y-3 rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
          <h3 className="text-lg font-bold">Rates drawn</h3>
          {model.rates.length === 0 ? (
            <p className="text-sm">No rate carries its uncertainty yet: give SEs, CIs, counts or distributions on the Rates tab.</p>
          ) : (
            <ul className="space-y-0.5 text-sm">
              {model.rates.map((r) => (
                <li key={r.rateId}>
                  <code className="font-bold">{r.name}</code>: {r.law.kind} with mean {fmt(r.mean)} and SD {fmt(r.sd)} <span className="text-ink/70">(from its {r.source === "ci" ? "CI" : r.source === "se" ? "SE" : r.source})</span>
                </li>
              ))}
            </ul>
          )}
          {model.issues.length > 0 && (
            <ul className="space-y-1 text-sm">
              {model.issues.map((i, k) => (
                <li key={k}>
                  <span aria-hidden="true" className={`font-bold ${i.severity === "error" ? "text-brick" : "text-ochre"}`}>
                    {i.severity === "error" ? "✕ " : "! "}
                  </span>
                  {i.message}
                </li>
              ))}
            </ul>
          )}
          {readOnly ? (
            <p className="text-sm">Your role in this Study lets you read the Runs and their results; editors start new ones.</p>
          ) : (
            <StartForm lifeCycleId={lifeCycleId} blocked={blockedReason(props)} onStarted={setPicked} />
          )}
          {!readOnly && <p className="text-xs text-ink/75">A Run uses the saved life cycle (version {version}).</p>}
        </div>

        <div className="min-w-0 space-y-4">
          <div className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
            <h3 className="mb-2 text-lg font-bold">Monte Carlo Runs</h3>
            {runs.isPending ? (
              <Loading label="Loading the Runs…" />
            ) : runs.isError ? (
              <QueryError error={runs.error} what="the Runs" onRetry={() => void runs.refetch()} />
            ) : list.length === 0 ? (
              <p className="text-sm">No Monte Carlo Run yet.</p>
            ) : (
              <ul className="space-y-1 text-sm" aria-label="Monte Carlo Runs">
                {list.map((r) => (
                  <li key={r.id}>
                    <button
                      type="button"
                      aria-pressed={r.id === shownId}
                      onClick={() => setPicked(r.id)}
                      className={`w-full rounded px-2 py-1 text-left hover:bg-ink/5 ${r.id === shownId ? "bg-indigo/10 font-bold" : ""}`}
                    >
                      {STATUS_WORDS[r.status]} · {drawsOf(r)} draws · <RelativeTime iso={r.createdAt} />
                      {r.createdBy && <> by {r.createdBy}</>}
                    </button>
                  </li>
                ))}
              </ul>
            )}
          </div>
          {shownId && <ShownRun key={shownId} lifeCycleId={lifeCycleId} runId={shownId} readOnly={readOnly} version={version} />}
        </div>
      </div>

      {shownId && (
        <ErrorBoundary what="the results of this Run" resetKey={shownId}>
          <ShownResults lifeCycleId={lifeCycleId} runId={shownId} />
        </ErrorBoundary>
      )}
    </section>
  );
}

const fmt = (x: number) => (Math.abs(x) >= 1e-3 && Math.abs(x) < 1e5 ? String(Number(x.toPrecision(3))) : x.toExponential(2));

function drawsOf(r: RunSummary): string {
  const d = (r.settings as { draws?: number } | null)?.draws;
  return typeof d === "number" ? d.toLocaleString("en") : "?";
}

function StartForm({ lifeCycleId, blocked, onStarted }: { lifeCycleId: string; blocked: string | null; onStarted: (id: string) => void }) {
  const start = useStartUncertaintyRun(lifeCycleId);
  const [draws, setDraws] = useState(String(DEFAULT_DRAWS));
  const [seed, setSeed] = useState("");
  const [problem, setProblem] = useState<{ field: "draws" | "seed"; message: string } | null>(null);
  const submit = (e: FormEvent) => {
    e.preventDefault();
    const d = Number(draws.replace(/[\s,_]/g, ""));
    if (!Number.isInteger(d) || d < MIN_DRAWS || d > MAX_DRAWS) {
      setProblem({ field: "draws", message: `The number of draws is a whole number from ${MIN_DRAWS.toLocaleString("en")} to ${MAX_DRAWS.toLocaleString("en")}.` });
      return;
    }
    const s = seed.trim() === "" ? undefined : Number(seed);
    if (s !== undefined && (!Number.isSafeInteger(s) || s < 0)) {
      setProblem({ field: "seed", message: "The seed is a whole number, 0 or more, or empty for a new one." });
      return;
    }
    setProblem(null);
    start.mutate({ draws: d, ...(s === undefined ? {} : { seed: s }) }, { onSuccess: (run) => onStarted(run.id) });
  };
  const serverFields = start.error && isApiError(start.error) ? start.error.fields : [];
  return (
    <form onSubmit={submit} className="space-y-3" noValidate>
      <div className="flex flex-wrap gap-4">
        <label className="block text-sm">
          <span className="font-bold">Draws</span>
          <input
            inputMode="numeric"
            value={draws}
            onChange={(e) => setDraws(e.target.value)}
            aria-invalid={problem?.field === "draws" || undefined}
            aria-describedby="uncertainty-draws-help"
            className={`mt-1 block w-32 rounded border bg-white px-2 py-1 tabular-nums ${problem?.field === "draws" ? "border-2 border-brick" : "border-ink/35"}`}
          />
        </label>
        <label className="block text-sm">
          <span className="font-bold">Seed</span> <span className="text-ink/75">(optional)</span>
          <input
            inputMode="numeric"
            value={seed}
            placeholder="new each Run"
            onChange={(e) => setSeed(e.target.value)}
            aria-invalid={problem?.field === "seed" || undefined}
            className={`mt-1 block w-36 rounded border bg-white px-2 py-1 tabular-nums ${problem?.field === "seed" ? "border-2 border-brick" : "border-ink/35"}`}
          />
        </label>
      </div>
      <p id="uncertainty-draws-help" className="text-xs text-ink/75">
        10,000 draws give P(λ &lt; 1) to about ±1 percentage point; the same seed gives the same result.
      </p>
      {problem && (
        <p className="text-sm font-bold text-brick" role="alert">
          ✕ {problem.message}
        </p>
      )}
      {start.error && (
        <Alert tone="error" title="The Run could not start.">
          {serverFields.length > 0 ? (
            <ul className="list-disc pl-5">
              {serverFields.map((f, k) => (
                <li key={k}>{f.message}</li>
              ))}
            </ul>
          ) : (
            <p>{start.error.message}</p>
          )}
        </Alert>
      )}
      {blocked && <p className="text-sm">{blocked}</p>}
      <Button type="submit" disabled={blocked !== null || start.isPending}>
        {start.isPending ? "Starting…" : "Start a Monte Carlo Run"}
      </Button>
    </form>
  );
}

function ShownRun({ lifeCycleId, runId, readOnly, version }: { lifeCycleId: string; runId: string; readOnly: boolean; version: number }) {
  const query = useRun(lifeCycleId, runId);
  const cancel = useCancelRun(lifeCycleId);
  if (query.isPending) return <Loading label="Loading the Run…" />;
  if (query.isError) return <QueryError error={query.error} what="this Run" onRetry={() => void query.refetch()} />;
  const run = query.data as unknown as UncertaintyRun;
  const percent = Math.round(run.progress * 100);
  return (
    <div className="space-y-3 rounded-lg border border-ink/15 bg-white p-5 shadow-sm" data-run-status={run.status}>
      <h3 className="text-lg font-bold">Shown Run</h3>
      <p className="text-sm">
        {STATUS_WORDS[run.status]}; started <RelativeTime iso={run.createdAt} />
        {run.createdBy && <> by {run.createdBy}</>}. Seed {String((run.settings as { seed?: number }).seed ?? "?")}.
      </p>
      {isActive(run.status) && (
        <div className="space-y-1">
          <div
            role="progressbar"
            aria-label="Progress of the Run"
            aria-valuemin={0}
            aria-valuemax={100}
            aria-valuenow={percent}
            aria-valuetext={`${run.chunksDone} of ${run.chunksTotal} chunks done (${percent} %)`}
            className="h-4 w-full overflow-hidden rounded-full border border-ink/30 bg-white"
          >
            <div className="h-full bg-indigo transition-[width] duration-300" style={{ width: `${Math.max(percent, 2)}%` }} />
          </div>
          <p className="flex items-center gap-2 text-sm tabular-nums">
            <Spinner /> {run.chunksDone} of {run.chunksTotal} chunks done ({percent} %)
          </p>
          {!readOnly && (
            <Button variant="secondary" size="sm" onClick={() => cancel.mutate(run.id)} disabled={cancel.isPending}>
              Cancel the Run
            </Button>
          )}
        </div>
      )}
      {run.status === "failed" && (
        <Alert tone="error" title="The Run failed.">
          <p>{run.error}</p>
        </Alert>
      )}
      {run.result && run.result.lifeCycleVersion !== version && (
        <p className="text-sm">
          <span aria-hidden="true" className="font-bold text-ochre">! </span>
          Computed from version {run.result.lifeCycleVersion} of the life cycle; it is now at version {version}. Start a new Run for the current rates.
        </p>
      )}
    </div>
  );
}

const Histogram = lazy(() => import("./uncertainty-chart").then((m) => ({ default: m.LambdaHistogramChart })));

function ShownResults({ lifeCycleId, runId }: { lifeCycleId: string; runId: string }) {
  const query = useRun(lifeCycleId, runId);
  const run = query.data as unknown as UncertaintyRun | undefined;
  if (!run || run.status !== "succeeded" || !run.result) return null;
  return (
    <section aria-labelledby="uncertainty-results-heading" className="space-y-4 rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
      <h3 id="uncertainty-results-heading" className="text-lg font-bold">
        Results of the shown Run
      </h3>
      <UncertaintyResults
        result={run.result}
        histogram={
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <Histogram result={run.result} />
          </Suspense>
        }
      />
    </section>
  );
}
