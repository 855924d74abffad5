/**
 * Baseline and scenarios side by side: λ with its verdict, Δλ, R0,
 * generation time, λ at the largest achievable change, cost and Δλ per unit
 * of cost, and — when a finished Risk run exists for the scenario — its
 * quasi-extinction probability by the chosen year. A Risk run for a scenario
 * reuses the settings (and seed) of the newest Risk run of the life cycle.
 */
import { useQueries } from "@tanstack/react-query";
import { Suspense, useState } from "react";
import type { LeversResponse } from "../../api/levers";
import { isActive, runQueryOptions, useRuns, useStartRiskRun, type RunSummary } from "../../api/runs";
import { Button } from "../../components/ui/button";
import { CommitInput } from "../../components/ui/commit-input";
import { formatLambda, formatNumber, formatPercent } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";
import { lambdaVerdict } from "../../lib/verdict";
import { LambdaBars } from "./lazy-charts";
import { ChartFallback, Section } from "./section";
import type { LeversPanelProps } from "./types";

const scenarioIdOf = (r: RunSummary): string | null => {
  const s = r.settings as { scenarioId?: unknown } | null;
  return typeof s?.scenarioId === "string" ? s.scenarioId : null;
};

const signed = (x: number, digits = 4) => (x > 0 ? "+" : x < 0 ? "−" : "") + Math.abs(x).toFixed(digits);

export function ComparisonSection({ data, lifeCycleId, readOnly, saveStatus, document: doc }: LeversPanelProps & { data: LeversResponse }) {
  const { rows } = data.comparison;
  const unit = data.timeStepUnit;
  const runs = useRuns(lifeCycleId);
  const start = useStartRiskRun(lifeCycleId);
  const [year, setYear] = useState<number | null>(null);
  const riskRuns = (runs.data ?? []).filter((r) => r.kind === "risk");
  const newest = (scenarioId: string | null) => riskRuns.find((r) => scenarioIdOf(r) === scenarioId);
  const newestDone = (scenarioId: string | null) => riskRuns.find((r) => scenarioIdOf(r) === scenarioId && r.status === "succeeded");
  const doneIds = rows.map((r) => newestDone(r.scenarioId)?.id).filter((id): id is string => id !== undefined);
  const results = useQueries({ queries: doneIds.map((id) => runQueryOptions(id)) });
  const resultOf = (id: string | undefined) => (id === undefined ? undefined : results[doneIds.indexOf(id)]?.data?.result ?? undefined);
  const baselineSettings = newestDone(null)?.settings as Record<string, unknown> | undefined;
  const baselineResult = resultOf(newestDone(null)?.id);
  const horizonYear = year ?? Math.min(50, baselineResult?.horizon ?? 50);
  const anyRisk = riskRuns.length > 0;
  const canStart = !readOnly && saveStatus === "saved" && baselineSettings !== undefined;
  const startBlocked = readOnly
    ? null
    : baselineSettings === undefined
      ? "Start a Risk run of the life cycle as it is (Risk tab) first: scenario runs reuse its settings."
      : saveStatus !== "saved"
        ? "A Risk run uses the saved life cycle: wait until your latest changes are saved."
        : null;

  const riskCell = (scenarioId: string | null) => {
    const run = newest(scenarioId);
    const done = newestDone(scenarioId);
    const result = resultOf(done?.id);
    if (run && isActive(run.status)) return <span className="flex items-center gap-1 text-ink/80">Risk run {formatPercent(run.progress, 0)}</span>;
    if (result) {
      if (horizonYear > result.horizon) return <span className="text-ink/80">the run covers {result.horizon} years</span>;
      const q = result.quasiExtinction.byYear;
      return (
        <span className="tabular-nums" title="95 % Wilson interval in brackets">
          {formatPercent(q.probability[horizonYear] ?? NaN)}{" "}
          <span className="text-ink/75">
            ({formatPercent(q.lower[horizonYear] ?? NaN)}–{formatPercent(q.upper[horizonYear] ?? NaN)})
          </span>
        </span>
      );
    }
    if (scenarioId !== null && canStart) {
      return (
        <Button
          size="sm"
          variant="secondary"
          disabled={start.isPending}
          onClick={() => start.mutate({ ...(baselineSettings as object), scenarioId } as Parameters<typeof start.mutate>[0])}
        >
          Start a Risk run
        </Button>
      );
    }
    return "—";
  };

  const costed = rows.filter((r) => r.deltaLambdaPerCost !== null).sort((p, q) => q.deltaLambdaPerCost! - p.deltaLambdaPerCost!);

  return (
    <Section
      id="levers-comparison"
      title="Comparison"
      help={
        <>
          <p>
            λ of each scenario is computed exactly on the changed life cycle. Generation time is the mean age of parents, in {unit}s. λ at the achievable change uses
            each change's largest achievable amount where the scenario gives one.
          </p>
          {anyRisk && <p>Quasi-extinction: the share of simulated futures that fell to the Risk threshold by the year chosen, from the newest finished Risk run of each scenario.</p>}
        </>
      }
    >
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-left text-sm" data-testid="levers-comparison">
          <caption className="sr-only">Baseline and scenarios compared</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              {["Scenario", "λ", "Δλ", "Verdict", "R0", "Generation time", "λ at achievable", "Cost", "Δλ per unit cost"].map((h) => (
                <th key={h} scope="col" className="px-2 py-2 whitespace-nowrap">
                  {h}
                </th>
              ))}
              <th scope="col" className="px-2 py-2 whitespace-nowrap">
                Quasi-extinction by year {horizonYear}
              </th>
            </tr>
          </thead>
          <tbody>
            {rows.map((r) => (
              <tr key={r.scenarioId ?? "baseline"} className="border-b border-ink/10 align-top" data-scenario={r.name}>
                <th scope="row" className="px-2 py-2 text-left">
                  <span className="font-bold">{r.name}</span>
                  {r.action && <span className="block max-w-64 font-normal text-ink/80">{r.action}</span>}
                  {r.scenarioId !== null && r.changeCount === 0 && <span className="block font-normal text-ink/75">no changes yet</span>}
                </th>
                {r.planned === null ? (
                  <td colSpan={8} className="px-2 py-2 text-brick">
                    <span aria-hidden="true">✕ </span>
                    {r.problem?.message}
                  </td>
                ) : (
                  <>
                    <td className="px-2 py-2 font-bold tabular-nums" data-col="lambda">
                      {formatLambda(r.planned.lambda)}
                    </td>
                    <td className="px-2 py-2 tabular-nums">{r.scenarioId === null ? "—" : signed(r.planned.deltaLambda)}</td>
                    <td className="px-2 py-2">
                      {lambdaVerdict(r.planned.lambda, unit).headline}
                      {!r.planned.isSound && <span className="block text-ochre">! {r.planned.warnings[0] ?? "The changed model fails a check."}</span>}
                    </td>
                    <td className="px-2 py-2 tabular-nums">{formatNumber(r.planned.netReproductiveRate, 4)}</td>
                    <td className="px-2 py-2 tabular-nums">{formatNumber(r.planned.generationTime, 3)}</td>
                    <td className="px-2 py-2 tabular-nums">{r.achievable ? `${formatLambda(r.achievable.lambda)} (${signed(r.achievable.deltaLambda)})` : "—"}</td>
                    <td className="px-2 py-2 tabular-nums">{r.cost === null ? "—" : formatNumber(r.cost, 6)}</td>
                    <td className="px-2 py-2 tabular-nums">{r.deltaLambdaPerCost === null ? "—" : formatNumber(r.deltaLambdaPerCost, 3)}</td>
                  </>
                )}
                <td className="px-2 py-2">{riskCell(r.scenarioId)}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      <div className="flex flex-wrap items-end gap-4 text-sm">
        {anyRisk && (
          <div className="w-56 space-y-1">
            <span className="block font-bold">Quasi-extinction by year</span>
            <CommitInput
              label="Quasi-extinction by year"
              value={String(horizonYear)}
              check={(t) => {
                const v = parseNumberInput(t);
                return { error: v === null || !Number.isInteger(v) || v < 1 || v > 1000 ? "A whole number of years from 1 to 1000." : null };
              }}
              onCommit={(t) => setYear(parseNumberInput(t)!)}
            />
          </div>
        )}
        {startBlocked && doc.scenarios?.length ? <p className="max-w-xl text-ink/80">{startBlocked}</p> : null}
        {start.error && <p className="font-bold text-brick">✕ {start.error.message}</p>}
      </div>
      {rows.length > 1 && (
        <Suspense fallback={<ChartFallback />}>
          <LambdaBars names={rows.map((r) => r.name)} lambdas={rows.map((r) => r.planned?.lambda ?? null)} ariaLabel="λ of the baseline and of each scenario, with the line λ = 1." />
        </Suspense>
      )}
      {costed.length > 0 && (
        <div className="space-y-2">
          <h4 className="font-bold">Per unit of cost</h4>
          <ol className="list-decimal space-y-1 pl-6 text-sm" data-testid="levers-per-cost">
            {costed.map((r) => (
              <li key={r.scenarioId}>
                <span className="font-bold">{r.name}</span>: Δλ {signed(r.planned!.deltaLambda)} for {formatNumber(r.cost, 6)} ={" "}
                <span className="tabular-nums">{formatNumber(r.deltaLambdaPerCost, 3)}</span> per unit
                {r.achievable && r.cost! > 0 && <> (at the achievable change {formatNumber(r.achievable.deltaLambda / r.cost!, 3)} per unit)</>}
              </li>
            ))}
          </ol>
        </div>
      )}
    </Section>
  );
}
