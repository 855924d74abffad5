/**
 * The life cycle's Risk runs, newest first: when, who, status and what was
 * asked, with a button to show any of them.
 */
import type { LifeCycle } from "../../../shared/lifecycle";
import type { RunSummary } from "../../api/runs";
import { Button } from "../../components/ui/button";
import { RelativeTime } from "../../components/ui/time";
import { summariseSettings } from "./risk-format";
import { STATUS_MARKS, STATUS_WORDS } from "./run-status";

export function RunsList({ runs, shownId, onShow, document: doc }: { runs: RunSummary[]; shownId: string | null; onShow: (id: string) => void; document: LifeCycle }) {
  const risk = runs.filter((r) => r.kind === "risk");
  if (risk.length === 0) return <p className="text-sm text-ink/80">No Risk runs yet for this life cycle.</p>;
  return (
    <ol className="max-h-80 divide-y divide-ink/10 overflow-y-auto" aria-label="Risk runs of this life cycle, newest first">
      {risk.map((run) => {
        const shown = run.id === shownId;
        return (
          <li key={run.id} className={`flex flex-wrap items-start justify-between gap-2 py-2 ${shown ? "rounded bg-indigo/5 px-2" : ""}`} data-run-id={run.id}>
            <div className="min-w-0 flex-1 text-sm">
              <p>
                <span className="font-bold">
                  <RelativeTime iso={run.createdAt} />
                </span>
                {run.createdBy && <> · {run.createdBy}</>}
                {" · "}
                <span>
                  <span aria-hidden="true">{STATUS_MARKS[run.status]} </span>
                  {STATUS_WORDS[run.status]}
                  {run.status === "running" && ` ${Math.round(run.progress * 100)} %`}
                </span>
              </p>
              <p className="text-ink/80">{summariseSettings(run.settings, doc)}</p>
            </div>
            {shown ? (
              <span className="px-2 py-1 text-sm font-bold text-indigo" aria-current="true">Shown</span>
            ) : (
              <Button variant="secondary" size="sm" onClick={() => onShow(run.id)}>
                Show<span className="sr-only"> the Run started {new Date(run.createdAt).toLocaleString()}</span>
              </Button>
            )}
          </li>
        );
      })}
    </ol>
  );
}
