/**
 * Risk: stochastic viability of the life cycle. Editors set up and start a
 * Run (computed by the workers in chunks, with a progress bar and Cancel);
 * everyone with access reads the past Runs and their results. The cautions
 * stay on the tab whatever it shows.
 */
import { useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import { RiskSettingsSchema } from "../../../shared/schemas/risk";
import { isApiError } from "../../api/client";
import { useCancelRun, useRun, useRuns, type RiskRun } from "../../api/runs";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { ErrorBoundary } from "../../components/ui/error-boundary";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import type { AnalysisState } from "../../lib/editor-types";
import { RiskResults } from "./risk-results";
import { RunStatus } from "./run-status";
import { RunsList } from "./runs-list";
import { RiskSettingsForm } from "./settings-form";
import { defaultValues, fromSettings, type RiskFormValues } from "./settings-model";

export const CAUTIONS =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

export interface RiskPanelProps {
  lifeCycleId: string;
  studyId: string;
  /** The editor's document (stage and rate names; a Run uses the saved one). */
  document: LifeCycle;
  analysis: AnalysisState;
  readOnly: boolean;
  /** The editor's save state: a Run computes the saved life cycle, so it starts only when nothing is pending. */
  saveStatus: "saved" | "unsaved" | "saving" | "invalid" | "failed" | "conflict";
  /** The saved version a Run would use. */
  version: number;
}

function blockedReason(props: RiskPanelProps): string | null {
  if (props.document.stages.length === 0) return "Add stages and arrows on the Diagram tab first.";
  switch (props.saveStatus) {
    case "saved":
      return null;
    case "unsaved":
    case "saving":
      return "Saving your latest changes… A Run uses the saved life cycle, so it can start once they are saved.";
    case "invalid":
    case "failed":
      return "Your latest changes are not saved (see the header). A Run uses the saved life cycle: fix the problem first.";
    case "conflict":
      return "Someone else saved this life cycle in the meantime (see the header). Resolve that first.";
  }
}

export function RiskPanel(props: RiskPanelProps) {
  const { lifeCycleId, studyId, document: doc, analysis, readOnly, version } = props;
  const runs = useRuns(lifeCycleId);
  const [picked, setPicked] = useState<string | null>(null);
  const riskRuns = (runs.data ?? []).filter((r) => r.kind === "risk");
  const shownId = picked ?? riskRuns[0]?.id ?? null;
  const [preset, setPreset] = useState<{ values: RiskFormValues; serial: number } | null>(null);
  const stableStage = analysis.data?.stableStage ?? null;

  /** Loads an earlier Run's settings into the form; false when they no longer read as settings (an older format). */
  const reuse = (run: RiskRun): boolean => {
    const parsed = RiskSettingsSchema.safeParse(run.settings);
    if (!parsed.success) return false;
    setPreset((p) => ({ values: fromSettings(parsed.data, defaultValues(doc, stableStage, lifeCycleId), doc), serial: (p?.serial ?? 0) + 1 }));
    window.document.getElementById("risk-new-run-heading")?.scrollIntoView({ block: "start" });
    return true;
  };

  return (
    <section aria-labelledby="risk-heading" className="space-y-5">
      <div className="space-y-2">
        <h2 id="risk-heading" className="text-xl font-bold">
          Risk
        </h2>
        <p className="max-w-4xl text-ink/85">
          How likely is the population to fall to a critical size, and how soon? A Run simulates many possible futures of this life cycle in which rates vary from year to year
          (and, if you wish, individuals live and breed by chance), and counts how many fall to the quasi-extinction threshold.
        </p>
        <Alert tone="info" live={false}>
          <p data-testid="risk-cautions">{CAUTIONS}</p>
        </Alert>
      </div>

      <div className="grid gap-5 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
        <div className="min-w-0 rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
          {readOnly ? (
            <div className="space-y-2">
              <h3 className="text-lg font-bold">New Runs</h3>
              <p className="text-sm">Your role in this Study lets you read the Runs and their results; editors start new ones.</p>
            </div>
          ) : (
            <RiskSettingsForm
              key={lifeCycleId}
              lifeCycleId={lifeCycleId}
              studyId={studyId}
              document={doc}
              stableStage={stableStage}
              blocked={blockedReason(props)}
              preset={preset}
              onStarted={(run) => setPicked(run.id)}
            />
          )}
          {!readOnly && <p className="mt-3 text-xs text-ink/75">A Run uses the saved life cycle (version {version}) and the other life cycles of the Study as they are saved.</p>}
        </div>

        {/* Sticky beside the long form, so the progress of a Run just started stays in view. */}
        <div className="min-w-0 space-y-4 self-start xl:sticky xl:top-4">
          <div className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
            <h3 className="mb-2 text-lg font-bold">Runs</h3>
            {runs.isPending ? (
              <Loading label="Loading the Runs…" />
            ) : runs.isError ? (
              <QueryError error={runs.error} what="the Runs" onRetry={() => void runs.refetch()} />
            ) : (
              <RunsList runs={runs.data} shownId={shownId} onShow={setPicked} document={doc} />
            )}
          </div>
          {shownId && <ShownRunStatus key={shownId} lifeCycleId={lifeCycleId} runId={shownId} readOnly={readOnly} onReuse={reuse} />}
        </div>
      </div>

      {shownId && (
        <ErrorBoundary what="the results of this Run" resetKey={shownId}>
          <ShownRunResults lifeCycleId={lifeCycleId} runId={shownId} />
        </ErrorBoundary>
      )}
    </section>
  );
}

function ShownRunStatus({ lifeCycleId, runId, readOnly, onReuse }: { lifeCycleId: string; runId: string; readOnly: boolean; onReuse: (run: RiskRun) => boolean }) {
  const run = useRun(lifeCycleId, runId);
  const cancel = useCancelRun(lifeCycleId);
  const [reuseFailed, setReuseFailed] = useState(false);
  return (
    <div className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm" aria-labelledby="risk-shown-run-heading">
      <h3 id="risk-shown-run-heading" className="mb-2 text-lg font-bold">
        Shown Run
      </h3>
      {run.isPending ? (
        <Loading label="Loading the Run…" />
      ) : run.isError ? (
        <QueryError error={run.error} what="this Run" onRetry={() => void run.refetch()} />
      ) : (
        <div className="space-y-3">
          <RunStatus
            run={run.data}
            canCancel={!readOnly}
            onCancel={() => cancel.mutate(run.data.id)}
            cancelling={cancel.isPending}
            // A 409 means it finished in the meantime: the refreshed status says so.
            cancelError={cancel.error && !(isApiError(cancel.error) && cancel.error.status === 409) ? cancel.error.message : null}
          />
          {run.data.status === "succeeded" && (
            <p className="text-sm">
              <a href="#risk-results-heading" className="font-bold text-indigo underline underline-offset-2">
                Results below
              </a>
            </p>
          )}
          {!readOnly && (
            <Button variant="quiet" size="sm" onClick={() => setReuseFailed(!onReuse(run.data))}>
              Put this Run’s settings in the form
            </Button>
          )}
          {reuseFailed && <p className="text-sm">This Run’s settings were stored by an earlier version of Stagewright and cannot be put in the form; set them by hand.</p>}
        </div>
      )}
    </div>
  );
}

function ShownRunResults({ lifeCycleId, runId }: { lifeCycleId: string; runId: string }) {
  const run = useRun(lifeCycleId, runId);
  if (!run.data || run.data.status !== "succeeded" || !run.data.result) return null;
  return (
    <section aria-labelledby="risk-results-heading" className="space-y-4 rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
      <h3 id="risk-results-heading" className="text-lg font-bold">
        Results of the shown Run
      </h3>
      <RiskResults result={run.data.result} />
    </section>
  );
}
