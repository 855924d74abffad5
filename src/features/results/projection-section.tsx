/**
 * A projection from numbers the person enters, n(t+1) = A n(t), with the
 * transient indices of that start. The request runs on the server (POST
 * /analyze with `initial`), on the current document.
 */
import { lazy, Suspense, useMemo, useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import { useProjection } from "../../api/projection";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Loading } from "../../components/ui/spinner";
import { formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";
import { steps as stepsWord } from "../../lib/verdict";

const ProjectionChart = lazy(() => import("./charts").then((m) => ({ default: m.ProjectionChart })));

const MAX_STEPS = 1000;

export function ProjectionSection({ document: doc, stableStage }: { document: LifeCycle; stableStage: readonly number[] | null }) {
  const stageKey = doc.stages.map((s) => s.id).join("|");
  const [draft, setDraft] = useState<{ key: string; values: string[] }>({ key: stageKey, values: doc.stages.map(() => "") });
  const values = draft.key === stageKey ? draft.values : doc.stages.map(() => "");
  const [stepsText, setStepsText] = useState("50");
  const [request, setRequest] = useState<{ key: string; initial: number[]; steps: number } | null>(null);
  const [logScale, setLogScale] = useState(false);
  const active = request !== null && request.key === stageKey ? request : null;
  const projection = useProjection(doc, active?.initial ?? null, active?.steps ?? 50);

  const parsed = values.map((v) => (v.trim() === "" ? 0 : parseNumberInput(v)));
  const badIndex = parsed.findIndex((v) => v === null || v < 0);
  const steps = Number(stepsText);
  const stepsOk = Number.isInteger(steps) && steps >= 1 && steps <= MAX_STEPS;
  const total = parsed.reduce<number>((s, v) => s + (v ?? 0), 0);
  const canRun = badIndex < 0 && stepsOk && total > 0;

  const setValue = (i: number, text: string) => setDraft({ key: stageKey, values: values.map((v, k) => (k === i ? text : v)) });
  const fillStable = () => {
    if (!stableStage || stableStage.length !== doc.stages.length) return;
    setDraft({ key: stageKey, values: stableStage.map((w) => String(Number((w * 1000).toPrecision(4)))) });
  };

  const result = projection.data?.projection ?? null;
  const transient = projection.data?.transient ?? null;
  const unit = doc.timeStepUnit;

  const summary = useMemo(() => {
    if (!result) return null;
    const last = result.total.length - 1;
    return { first: result.total[0] ?? 0, last: result.total[last] ?? 0, steps: last };
  }, [result]);

  return (
    <div className="space-y-4">
      <form
        className="space-y-3"
        onSubmit={(e) => {
          e.preventDefault();
          if (canRun) setRequest({ key: stageKey, initial: parsed.map((v) => v ?? 0), steps });
        }}
      >
        <fieldset>
          <legend className="mb-2 text-sm font-bold">Individuals in each stage now</legend>
          <div className="flex flex-wrap gap-3">
            {doc.stages.map((s, i) => (
              <label key={s.id} className="w-36 space-y-1 text-sm">
                <span className="block truncate" title={s.name}>
                  {s.name}
                </span>
                <input
                  value={values[i] ?? ""}
                  onChange={(e) => setValue(i, e.target.value)}
                  inputMode="decimal"
                  placeholder="0"
                  aria-invalid={i === badIndex || undefined}
                  className={`block w-full rounded border bg-white px-2 py-1 text-right tabular-nums ${i === badIndex ? "border-2 border-brick" : "border-ink/35"}`}
                />
              </label>
            ))}
          </div>
        </fieldset>
        <div className="flex flex-wrap items-end gap-4">
          <label className="space-y-1 text-sm">
            <span className="block font-bold">Time steps</span>
            <input
              value={stepsText}
              onChange={(e) => setStepsText(e.target.value)}
              inputMode="numeric"
              aria-invalid={!stepsOk || undefined}
              className={`block w-24 rounded border bg-white px-2 py-1 text-right tabular-nums ${stepsOk ? "border-ink/35" : "border-2 border-brick"}`}
            />
          </label>
          <Button type="submit" disabled={!canRun} pending={projection.isFetching}>
            Project
          </Button>
          {stableStage && (
            <Button type="button" variant="secondary" onClick={fillStable}>
              Fill with 1000 at the stable structure
            </Button>
          )}
          <label className="inline-flex items-center gap-2 text-sm">
            <input type="checkbox" checked={logScale} onChange={(e) => setLogScale(e.target.checked)} className="size-4 accent-spruce" />
            Log scale
          </label>
        </div>
        {badIndex >= 0 && <p className="text-sm font-bold text-brick">✕ Numbers of individuals are numbers ≥ 0 ({doc.stages[badIndex]?.name}).</p>}
        {!stepsOk && <p className="text-sm font-bold text-brick">✕ Time steps: a whole number from 1 to {MAX_STEPS}.</p>}
        {badIndex < 0 && total === 0 && <p className="text-sm text-ink/75">Enter at least one individual to project.</p>}
      </form>

      {projection.isError && (
        <Alert tone="error" title="The projection could not be computed.">
          {projection.error.message}
        </Alert>
      )}
      {result && summary && (
        <div className={`space-y-3 ${projection.isPlaceholderData ? "opacity-60" : ""}`}>
          <p className="text-sm">
            From <strong className="tabular-nums">{formatNumber(summary.first, 4)}</strong> individuals now to <strong className="tabular-nums">{formatNumber(summary.last, 4)}</strong> individuals after{" "}
            {stepsWord(String(summary.steps), unit)}.{result.truncatedReason && ` ${result.truncatedReason}`}
          </p>
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <ProjectionChart
              stageNames={projection.data?.stageNames ?? []}
              population={result.population}
              total={result.total}
              logScale={logScale}
              timeStepUnit={unit}
              ariaLabel={`Projected numbers over ${summary.steps} time steps, total and by stage`}
            />
          </Suspense>
          {transient && (
            <dl className="grid gap-3 text-sm sm:grid-cols-3">
              <div>
                <dt className="font-bold">Reactivity</dt>
                <dd>
                  <span className="tabular-nums">{formatNumber(transient.reactivity, 3)}</span>
                  <p className="text-xs text-ink/75">
                    Size after one step relative to a population that grew at λ from the start{transient.firstStepAttenuation ? " — below 1: this start first shrinks." : "."}
                  </p>
                </dd>
              </div>
              <div>
                <dt className="font-bold">Largest amplification</dt>
                <dd>
                  <span className="tabular-nums">{formatNumber(transient.maxAmplification, 3)}</span> <span className="text-ink/75">at step {transient.maxAmplificationTime}</span>
                  <p className="text-xs text-ink/75">The biggest boost this starting structure gives, relative to growth at λ.</p>
                </dd>
              </div>
              <div>
                <dt className="font-bold">Inertia</dt>
                <dd>
                  <span className="tabular-nums">{formatNumber(transient.inertia, 3)}</span>
                  <p className="text-xs text-ink/75">Long-run size relative to a population that started at the stable structure with the same numbers.</p>
                </dd>
              </div>
            </dl>
          )}
        </div>
      )}
    </div>
  );
}
