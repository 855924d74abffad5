/**
 * Results: λ as the headline with a plain verdict, then w and v, elasticities
 * and sensitivities, vital-rate sensitivities, the checks of the model, life
 * history, and a projection from numbers the person enters. Every number has
 * a short explanation beside it. While the analysis is out of date the
 * numbers are dimmed and marked as recomputing, or as the last good result
 * when the current model cannot be analysed.
 */
import { lazy, Suspense, type ReactNode } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import type { LifeCycleAnalysis } from "../../../shared/schemas/life-cycles";
import type { ApiError } from "../../api/client";
import { Alert } from "../../components/ui/alert";
import { Badge } from "../../components/ui/badge";
import { Loading, Spinner } from "../../components/ui/spinner";
import type { EditorPanelProps } from "../../lib/editor-types";
import { formatLambda, formatNumber } from "../../lib/number-format";
import { DiagnosticsList } from "./diagnostics-list";
import { Figure } from "./figure";
import { ProjectionSection } from "./projection-section";
import { SensitivityTable } from "./sensitivity-table";
import { censusNote, lambdaVerdict, steps as stepsWord } from "../../lib/verdict";
import { LambdaInterval, UncertaintySection } from "./uncertainty-section";
import { VitalRatesTable } from "./vital-rates-table";

const StageBars = lazy(() => import("./charts").then((m) => ({ default: m.StageBars })));
const ElasticityHeatmap = lazy(() => import("./charts").then((m) => ({ default: m.ElasticityHeatmap })));

/** The heatmap is drawn up to this many stages; beyond it the table carries the numbers. */
const HEATMAP_MAX_STAGES = 60;

export const CAUTIONS =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

export function ResultsPanel({ document: doc, analysis, onSelect }: EditorPanelProps) {
  const { data, stale, pending, error } = analysis;
  return (
    <section aria-labelledby="results-heading" className="space-y-5">
      <h2 id="results-heading" className="text-xl font-bold">
        Results
      </h2>

      {data === undefined ? (
        error ? (
          <ModelError error={error} document={doc} title="The life cycle cannot be analysed yet." />
        ) : pending ? (
          <Loading label="Analysing the life cycle…" />
        ) : (
          <p className="rounded-md border border-dashed border-ink/30 p-4 text-ink/80">No results yet. Add stages and arrows in the Diagram; the analysis runs as you edit.</p>
        )
      ) : (
        <>
          {stale && (error ? <ModelError error={error} document={doc} title="Last good result — the current model has an error:" /> : <Recomputing />)}
          <div className={`space-y-6 transition-opacity ${stale ? "opacity-55" : ""}`} aria-busy={stale && pending ? true : undefined} data-stale={stale || undefined}>
            <Analysis data={data} document={doc} stale={stale} onSelect={onSelect} />
          </div>
        </>
      )}

      <footer className="border-t border-ink/15 pt-3 text-sm text-ink/85">
        <p>
          <span aria-hidden="true" className="mr-1 font-bold text-indigo">
            i
          </span>
          {CAUTIONS}
        </p>
      </footer>
    </section>
  );
}

function Recomputing() {
  return (
    <p role="status" className="flex items-center gap-2 rounded-md border border-indigo/40 bg-indigo/5 px-3 py-2 text-sm">
      <Spinner />
      Recomputing… the numbers below are for the model as it was a moment ago.
    </p>
  );
}

/** Why the current model cannot be analysed, with each problem tied to its arrow. */
function ModelError({ error, document: doc, title }: { error: ApiError; document: LifeCycle; title: string }) {
  const problems = error.fields.map((f) => {
    const m = /^document\.transitions\.(\d+)\./.exec(f.path);
    const t = m ? doc.transitions[Number(m[1])] : undefined;
    const name = (id: string) => doc.stages.find((s) => s.id === id)?.name ?? id;
    return { where: t ? `${name(t.from)} → ${name(t.to)} (${t.kind})` : null, message: f.message };
  });
  return (
    <Alert tone={title.startsWith("Last good") ? "warning" : "error"} title={title}>
      {problems.length === 0 ? (
        <p>{error.message}</p>
      ) : (
        <ul className="list-disc pl-5">
          {problems.map((p, k) => (
            <li key={k}>
              {p.where && <strong>{p.where}: </strong>}
              {p.message}
            </li>
          ))}
        </ul>
      )}
    </Alert>
  );
}

function Section({ title, help, children }: { title: string; help?: ReactNode; children: ReactNode }) {
  return (
    <section className="space-y-3">
      <div>
        <h3 className="text-lg font-bold">{title}</h3>
        {help && <p className="max-w-3xl text-sm text-ink/80">{help}</p>}
      </div>
      {children}
    </section>
  );
}

function Analysis({ data, document: doc, stale, onSelect }: { data: LifeCycleAnalysis; document: LifeCycle; stale: boolean; onSelect: EditorPanelProps["onSelect"] }) {
  const unit = data.timeStepUnit;
  const units = stepsWord("2", unit).replace(/^2 /, "");
  const verdict = lambdaVerdict(data.lambda, unit);
  const lh = data.lifeHistory;
  const names = data.stageNames;
  const scaledTo = data.reproductiveValueScaling ? (names[data.reproductiveValueScaling.index] ?? names[0]) : null;
  const why = (field: string) => data.nullReasons[field] ?? null;

  return (
    <>
      {/* The headline */}
      <div className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
        <div className="flex flex-wrap items-baseline gap-x-4 gap-y-1">
          <p className="text-4xl font-bold tabular-nums" data-testid="lambda">
            λ = {formatLambda(data.lambda)}
          </p>
          <p className="text-2xl">
            {verdict.trend === "declining" && <span aria-hidden="true">↘ </span>}
            {verdict.trend === "growing" && <span aria-hidden="true">↗ </span>}
            {verdict.trend === "stable" && <span aria-hidden="true">→ </span>}
            <span className="font-bold">{verdict.headline.charAt(0).toUpperCase() + verdict.headline.slice(1)}</span>
          </p>
          {stale && <Badge tone="warning">not current</Badge>}
          {!data.isSound && <Badge tone="warning">see the checks below</Badge>}
        </div>
        <LambdaInterval uncertainty={data.uncertainty ?? null} />
        {verdict.detail && <p className="mt-2">{verdict.detail}</p>}
        <p className="mt-2 text-sm text-ink/80">
          λ is the factor by which numbers multiply each {unit} once the mix of stages has settled: above 1 the population grows, below 1 it declines. It assumes the rates stay as they
          are, with no chance events and no crowding.
        </p>
        <p className="mt-1 text-sm text-ink/80">{censusNote(data.census)}</p>
      </div>

      <Section title="How sure: uncertainty from the rates" help="Intervals for the headline results from the uncertainty each vital rate carries (its SE, CI, counts or distribution, and the correlations between rates).">
        <UncertaintySection uncertainty={data.uncertainty ?? null} units={units} />
      </Section>

      <Section title="Checks of the model" help="Plain-language checks of the matrix. A stage named in a check is a button that shows it in the diagram.">
        <DiagnosticsList diagnostics={data.diagnostics} stageIds={data.stageIds} stageNames={names} onSelect={onSelect} />
      </Section>

      <Section title="How fast the structure settles">
        <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
          <Figure
            label="Damping ratio ρ"
            value={formatNumber(data.dampingRatio, 4)}
            why={data.dampingRatio === null ? why("dampingRatio") : null}
            help="λ divided by the size of the next-largest eigenvalue. The further above 1, the sooner the population settles to its stable structure."
          />
          <Figure
            label={`Convergence time (${data.convergenceFactor}×)`}
            value={formatNumber(data.convergenceTime, 3)}
            unit={data.convergenceTime === null ? undefined : units}
            why={data.convergenceTime === null ? why("convergenceTime") : null}
            help={`Time until the stable structure outweighs the next-slowest pattern ${data.convergenceFactor} times more than at the start (ln ${data.convergenceFactor} / ln ρ).`}
          />
          {data.period !== null && (
            <Figure label="Period of oscillation" value={formatNumber(data.period, 3)} unit={units} help="The structure swings with this period while it settles, because the next-largest eigenvalue is complex." />
          )}
        </dl>
      </Section>

      <Section title="Life history" help={lh === null ? (why("lifeHistory") ?? undefined) : undefined}>
        {lh && (
          <dl className="grid gap-3 sm:grid-cols-2 lg:grid-cols-3">
            <Figure
              label="Net reproductive rate R0"
              value={formatNumber(lh.netReproductiveRate, 4)}
              unit="offspring per lifetime"
              help="Offspring an individual produces over its whole life, on average. Above 1 each generation more than replaces itself."
            />
            <Figure
              label="Generation time from R0 (ln R0 / ln λ)"
              value={formatNumber(lh.generationTimeR0, 4)}
              unit={lh.generationTimeR0 === null ? undefined : units}
              why={lh.generationTimeR0 === null ? lh.nullReasons.generationTimeR0 : null}
              help="The time the population takes to grow by a factor R0."
            />
            <Figure
              label="Generation time as mean age of parents"
              value={formatNumber(lh.meanAgeOfParents, 4)}
              unit={lh.meanAgeOfParents === null ? undefined : units}
              why={lh.meanAgeOfParents === null ? lh.nullReasons.meanAgeOfParents : null}
              help="The average age of the parents of this year's offspring at the stable structure; the “generation length” of the IUCN criteria."
            />
          </dl>
        )}
      </Section>

      <Section
        title="Stable stage distribution and reproductive values"
        help={
          <>
            <strong>w</strong>: the share of individuals in each stage once the mix has settled (shares sum to 1). <strong>v</strong>: what an individual in each stage is worth to future
            growth, {scaledTo ? <>scaled so that v = 1 for {scaledTo}</> : "not defined for this matrix"}. <strong>Life expectancy</strong> counts the current {unit}.
          </>
        }
      >
        <StageTable data={data} />
        <div className="grid gap-4 lg:grid-cols-2">
          {data.stableStage ? (
            <div>
              <h4 className="text-sm font-bold">Stable stage distribution w</h4>
              <Suspense fallback={<Loading label="Loading the chart…" />}>
                <StageBars stageNames={names} values={data.stableStage} valueLabel="share of individuals (sums to 1)" ariaLabel="Bar chart of the stable stage distribution; the numbers are in the table above." />
              </Suspense>
            </div>
          ) : (
            <p className="text-sm">{why("stableStage")}</p>
          )}
          {data.reproductiveValue ? (
            <div>
              <h4 className="text-sm font-bold">Reproductive value v</h4>
              <Suspense fallback={<Loading label="Loading the chart…" />}>
                <StageBars
                  stageNames={names}
                  values={data.reproductiveValue}
                  valueLabel={`relative to ${scaledTo ?? "the first stage"} (= 1)`}
                  color="indigo"
                  ariaLabel="Bar chart of the reproductive values; the numbers are in the table above."
                />
              </Suspense>
            </div>
          ) : (
            <p className="text-sm">{why("reproductiveValue")}</p>
          )}
        </div>
      </Section>

      <Section
        title="Elasticity and sensitivity of λ to matrix entries"
        help="Elasticity: the proportional change in λ for a proportional change in an entry; elasticities sum to 1, so they rank entries on one scale. Sensitivity: the change in λ per unit change in an entry. Entries that are zero (no arrow) have a sensitivity too, but they are not levers. Neither says what a change would cost or whether it can be achieved."
      >
        {data.elasticity && data.sensitivity ? (
          <>
            {names.length <= HEATMAP_MAX_STAGES ? (
              <Suspense fallback={<Loading label="Loading the chart…" />}>
                <ElasticityHeatmap
                  stageNames={names}
                  elasticity={data.elasticity}
                  structuralZero={data.structuralZero}
                  ariaLabel="Heatmap of elasticities, rows the stage at t+1, columns the stage at t, from pale (0) to dark green (largest); the numbers are in the table below."
                />
              </Suspense>
            ) : (
              <p className="text-sm text-ink/80">With {names.length} stages the heatmap would be unreadable; the table lists the entries.</p>
            )}
            <SensitivityTable data={data} />
          </>
        ) : (
          <p className="text-sm">{why("sensitivity")}</p>
        )}
      </Section>

      <Section
        title="Vital rates"
        help="How λ responds to each named vital rate, through every arrow whose formula uses it. Vital-rate elasticities do not sum to 1."
      >
        <VitalRatesTable rates={data.vitalRates} />
      </Section>

      <Section title="Projection" help={`Numbers ${unit} by ${unit} from a starting population you enter, on the current model (n(t+1) = A n(t)), without chance events.`}>
        <ProjectionSection document={doc} stableStage={stale ? null : data.stableStage} />
      </Section>
    </>
  );
}

function StageTable({ data }: { data: LifeCycleAnalysis }) {
  const lh = data.lifeHistory;
  const units = stepsWord("2", data.timeStepUnit).replace(/^2 /, "");
  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">Stable stage distribution, reproductive values and life history by stage</caption>
        <thead>
          <tr className="border-b-2 border-ink/20">
            <th scope="col" className="px-2 py-2">Stage</th>
            <th scope="col" className="px-2 py-2 text-right">w (share)</th>
            <th scope="col" className="px-2 py-2 text-right">v (reproductive value)</th>
            {lh && (
              <>
                <th scope="col" className="px-2 py-2 text-right">Life expectancy ± SD ({units})</th>
                <th scope="col" className="px-2 py-2 text-right">Chance of ever reproducing</th>
                <th scope="col" className="px-2 py-2 text-right">Mean time to first reproduction ({units})</th>
              </>
            )}
          </tr>
        </thead>
        <tbody>
          {data.stageNames.map((name, i) => {
            const sd = lh ? Math.sqrt(Math.max(0, lh.lifeExpectancyVariance[i] ?? 0)) : 0;
            return (
              <tr key={data.stageIds[i] ?? i} className="border-b border-ink/10">
                <th scope="row" className="px-2 py-1.5 font-bold">
                  {name}
                </th>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(data.stableStage?.[i], 4)}</td>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(data.reproductiveValue?.[i], 4)}</td>
                {lh && (
                  <>
                    <td className="px-2 py-1.5 text-right tabular-nums">
                      {formatNumber(lh.lifeExpectancy[i], 4)} ± {formatNumber(sd, 3)}
                    </td>
                    <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(lh.probabilityOfReproducing[i], 3)}</td>
                    <td className="px-2 py-1.5 text-right tabular-nums">{lh.meanAgeAtFirstReproduction[i] === null ? "never" : formatNumber(lh.meanAgeAtFirstReproduction[i], 3)}</td>
                  </>
                )}
              </tr>
            );
          })}
        </tbody>
      </table>
    </div>
  );
}
