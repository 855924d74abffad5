import type { AnalysisState } from "../../lib/editor-types";
import { Spinner } from "../../components/ui/spinner";

/** λ to 4 decimals, as everywhere in Stagewright. */
export function formatLambda(lambda: number): string {
  return lambda.toFixed(4);
}

/**
 * The headline number in the editor header. A number that does not describe
 * the current document is never shown bare: it says it is being recomputed,
 * or that the current document cannot be analysed.
 */
export function LambdaReadout({ analysis, hasStages, timeStepUnit }: { analysis: AnalysisState; hasStages: boolean; timeStepUnit: string }) {
  const { data, stale, pending, error } = analysis;
  const state = !hasStages ? "empty" : data === undefined ? (error && !pending ? "error" : "pending") : stale ? (error && !pending ? "error" : "stale") : "current";

  return (
    <div
      className="flex items-baseline gap-2 rounded-md border border-ink/15 bg-white px-3 py-1.5"
      data-lambda-state={state}
      title={`Asymptotic growth factor per ${timeStepUnit}`}
    >
      <span className="font-bold" id="lambda-label">
        λ
      </span>
      <output aria-labelledby="lambda-label" className={`text-lg font-bold tabular-nums ${state === "current" ? "" : "text-ink/55"}`} data-lambda>
        {data && hasStages ? formatLambda(data.lambda) : "—"}
      </output>
      <span className="text-sm text-ink/80" aria-live="polite">
        {state === "empty" && "add stages to compute"}
        {state === "pending" && (
          <span className="inline-flex items-center gap-1">
            <Spinner className="size-3" /> computing…
          </span>
        )}
        {state === "stale" && (
          <span className="inline-flex items-center gap-1">
            <Spinner className="size-3" /> recomputing…
          </span>
        )}
        {state === "error" && <span className="font-bold text-brick">{data ? "out of date: " : ""}cannot compute</span>}
        {state === "current" && <span className="sr-only">per {timeStepUnit}</span>}
      </span>
    </div>
  );
}
