/**
 * Where a Run stands: queued, computing (a progress bar with chunks done of
 * chunks total, and Cancel for editors), failed, cancelled or finished.
 */
import type { RiskRun } from "../../api/runs";
import { isActive } from "../../api/runs";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { RelativeTime } from "../../components/ui/time";

export const STATUS_WORDS: Record<RiskRun["status"], string> = {
  queued: "Waiting for a worker",
  running: "Computing",
  succeeded: "Finished",
  failed: "Failed",
  cancelled: "Cancelled",
};

/** A mark beside the status word, so status never rests on colour. */
export const STATUS_MARKS: Record<RiskRun["status"], string> = {
  queued: "○",
  running: "▶",
  succeeded: "✓",
  failed: "✕",
  cancelled: "■",
};

export function ProgressBar({ run }: { run: Pick<RiskRun, "progress" | "chunksDone" | "chunksTotal" | "status"> }) {
  const percent = Math.round(run.progress * 100);
  const text = `${run.chunksDone} of ${run.chunksTotal} chunks done (${percent} %)`;
  return (
    <div className="space-y-1">
      <div
        role="progressbar"
        aria-label="Progress of the Run"
        aria-valuemin={0}
        aria-valuemax={100}
        aria-valuenow={percent}
        aria-valuetext={text}
        className="h-4 w-full overflow-hidden rounded-full border border-ink/30 bg-white"
      >
        <div className="h-full bg-indigo transition-[width] duration-300" style={{ width: `${Math.max(percent, run.status === "running" ? 2 : 0)}%` }} />
      </div>
      <p className="text-sm tabular-nums" data-testid="run-chunks">
        {text}
      </p>
    </div>
  );
}

export function RunStatus({ run, canCancel, onCancel, cancelling, cancelError }: { run: RiskRun; canCancel: boolean; onCancel: () => void; cancelling: boolean; cancelError: string | null }) {
  const active = isActive(run.status);
  return (
    <div className="space-y-3" data-run-status={run.status}>
      <p className="text-sm">
        Started <RelativeTime iso={run.createdAt} />
        {run.createdBy && <> by {run.createdBy}</>}
        {run.finishedAt && (
          <>
            {" "}
            · ended <RelativeTime iso={run.finishedAt} />
          </>
        )}
      </p>
      <p role="status" className="font-bold">
        <span aria-hidden="true" className="mr-1">
          {STATUS_MARKS[run.status]}
        </span>
        {STATUS_WORDS[run.status]}
        {run.status === "queued" && <span className="font-normal"> — a worker picks the Run up as soon as one is free.</span>}
      </p>
      {(active || run.status === "cancelled") && <ProgressBar run={run} />}
      {active && canCancel && (
        <Button variant="secondary" size="sm" onClick={onCancel} pending={cancelling}>
          Cancel run
        </Button>
      )}
      {cancelError && <Alert tone="error">{cancelError}</Alert>}
      {run.status === "failed" && (
        <Alert tone="error" title="The Run failed.">
          <p>{run.error ?? "The server gave no reason."}</p>
        </Alert>
      )}
      {run.status === "cancelled" && <p className="text-sm text-ink/85">Cancelled before it finished: there are no results. Start a new Run to compute them.</p>}
    </div>
  );
}
