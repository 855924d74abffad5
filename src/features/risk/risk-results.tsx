/**
 * The result of a finished Risk run: the headline numbers, quasi-extinction
 * probability over time with its band and a table at chosen years, the
 * stochastic growth rate two ways, the distribution of final abundance, mean
 * abundance over time, and the IUCN Red List criterion E check. Each number
 * has a plain explanation beside it.
 */
import { lazy, Suspense, type ReactNode } from "react";
import { Loading } from "../../components/ui/spinner";
import type { RiskRunResult } from "../../api/runs";
import { formatLambda, formatNumber } from "../../lib/number-format";
import { CriterionETable } from "./criterion-e-table";
import { formatCount, formatProbability, formatProbabilityRange, pluralOf, timeSpan } from "./risk-format";

const QuasiExtinctionChart = lazy(() => import("./risk-charts").then((m) => ({ default: m.QuasiExtinctionChart })));
const FinalAbundanceChart = lazy(() => import("./risk-charts").then((m) => ({ default: m.FinalAbundanceChart })));
const AbundanceChart = lazy(() => import("./risk-charts").then((m) => ({ default: m.AbundanceChart })));

function Section({ title, help, children, id }: { title: string; help?: ReactNode; children: ReactNode; id?: string }) {
  return (
    <section className="space-y-3" aria-labelledby={id}>
      <div>
        <h4 id={id} className="text-lg font-bold">
          {title}
        </h4>
        {help && <div className="max-w-3xl text-sm text-ink/80">{help}</div>}
      </div>
      {children}
    </section>
  );
}

/** One number with its name and a plain explanation (as on the Results tab). */
function Figure({ label, value, detail, help, testId }: { label: ReactNode; value: ReactNode; detail?: ReactNode; help: ReactNode; testId?: string }) {
  return (
    <div className="rounded-md border border-ink/15 bg-white p-3">
      <dt className="text-sm font-bold">{label}</dt>
      <dd className="mt-1">
        <span className="text-2xl font-bold tabular-nums" data-testid={testId}>
          {value}
        </span>
        {detail && <p className="mt-1 text-sm text-ink/90 tabular-nums">{detail}</p>}
        <p className="mt-1 text-xs text-ink/75">{help}</p>
      </dd>
    </div>
  );
}

const chart = (node: ReactNode) => <Suspense fallback={<Loading label="Loading the chart…" />}>{node}</Suspense>;

export function RiskResults({ result }: { result: RiskRunResult }) {
  const unit = result.timeStepUnit;
  const units = pluralOf(unit);
  const T = result.horizon;
  const q = result.quasiExtinction;
  const threshold = result.threshold;
  const thresholdStages = threshold.stages?.map((i) => result.stageNames[i] ?? `stage ${i + 1}`) ?? null;
  const thresholdWords = `${formatCount(threshold.value)} or fewer individuals${thresholdStages ? ` in ${thresholdStages.join(", ")}` : " in total"}`;
  const sim = result.growthRate.simulated;
  const approx = result.growthRate.approximation;
  const fa = result.finalAbundance;
  const quantile = (p: number) => fa.quantiles.find((x) => Math.abs(x.p - p) < 1e-9);
  const median = quantile(0.5);
  const lo = quantile(0.025);
  const hi = quantile(0.975);
  const censored = (x: typeof lo) => (x?.censored === "below" ? "below " : x?.censored === "above" ? "above " : "");
  const why = (field: string) => result.nullReasons[field] ?? null;

  return (
    <div className="space-y-8" data-testid="risk-results">
      {!result.complete && (
        <p className="rounded-md border-l-4 border-ochre bg-ochre/10 px-3 py-2 text-sm">Provisional: not every replicate of this Run was merged, so the numbers rest on fewer replicates than planned.</p>
      )}

      <dl className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4">
        <Figure
          label={`Quasi-extinct within ${timeSpan(T, unit)}`}
          value={formatProbability(q.share)}
          testId="risk-share"
          detail={`${q.count.toLocaleString("en")} of ${result.replicates.toLocaleString("en")} replicates (95 % interval ${formatProbabilityRange(q.byYear.lower[T] ?? 0, q.byYear.upper[T] ?? 0)})`}
          help={`The share of simulated futures in which the population fell to ${thresholdWords} at least once. Quasi-extinction is a level too low to recover from reliably, set above zero.`}
        />
        <Figure
          label="Median time to quasi-extinction"
          value={q.medianTime === null ? "none" : timeSpan(q.medianTime, unit)}
          testId="risk-median-time"
          detail={
            q.medianTime === null
              ? (q.medianTimeReason ?? why("quasiExtinction.medianTime"))
              : q.medianTimeBand.earliest !== null || q.medianTimeBand.latest !== null
                ? `95 % band: ${q.medianTimeBand.earliest === null ? "—" : timeSpan(q.medianTimeBand.earliest, unit)} to ${q.medianTimeBand.latest === null ? `beyond ${timeSpan(T, unit)}` : timeSpan(q.medianTimeBand.latest, unit)}`
                : null
          }
          help="The time by which half of the simulated futures had fallen to the threshold. It exists only when at least half of them do within the Run."
        />
        <Figure
          label="Stochastic growth rate λs (simulation)"
          value={sim ? formatLambda(sim.lambdaS) : "—"}
          testId="risk-lambda-s"
          detail={sim ? `95 % CI ${formatLambda(Math.exp(sim.lower))} – ${formatLambda(Math.exp(sim.upper))}` : why("growthRate.simulated")}
          help={`The typical growth factor per ${unit} in a varying environment, averaged along the simulated futures. Below 1: most futures decline in the long run.`}
        />
        <Figure
          label="λs by Tuljapurkar’s approximation"
          value={approx ? formatLambda(approx.lambdaS) : "—"}
          testId="risk-lambda-tuljapurkar"
          detail={approx ? `λ of the average matrix ${formatLambda(approx.lambdaMean)}` : why("growthRate.approximation")}
          help="A formula from the average matrix and how much its entries vary from year to year; close to the simulation when the variation is small."
        />
      </dl>

      <Section
        id="risk-quasi-extinction"
        title="Probability of quasi-extinction over time"
        help={
          <>
            The chance that the population has fallen to {thresholdWords} at least once by each {unit} (it can only grow with time). The shaded band is the 95 % interval from the
            number of replicates: more replicates make it narrower.
          </>
        }
      >
        {chart(
          <QuasiExtinctionChart
            year={q.byYear.year}
            probability={q.byYear.probability}
            lower={q.byYear.lower}
            upper={q.byYear.upper}
            timeStepUnit={unit}
            ariaLabel={`Line chart of the probability of quasi-extinction over ${timeSpan(T, unit)}, with its 95 % interval as a band; the table below has the numbers at chosen ${units}.`}
          />,
        )}
        <div className="overflow-x-auto">
          <table className="w-full max-w-3xl border-collapse text-left text-sm" data-testid="quasi-extinction-table">
            <caption className="pb-2 text-left font-bold">Quasi-extinction probability by chosen {units}</caption>
            <thead>
              <tr className="border-b-2 border-ink/20">
                <th scope="col" className="px-2 py-2">
                  Within ({units})
                </th>
                <th scope="col" className="px-2 py-2 text-right">
                  Probability
                </th>
                <th scope="col" className="px-2 py-2 text-right">
                  95 % interval
                </th>
                <th scope="col" className="px-2 py-2 text-right">
                  Replicates quasi-extinct
                </th>
              </tr>
            </thead>
            <tbody>
              {q.table.map((row) => (
                <tr key={row.year} className="border-b border-ink/10">
                  <th scope="row" className="px-2 py-1.5 font-bold tabular-nums">
                    {row.year}
                  </th>
                  <td className="px-2 py-1.5 text-right tabular-nums">{formatProbability(row.probability)}</td>
                  <td className="px-2 py-1.5 text-right tabular-nums">{formatProbabilityRange(row.lower, row.upper)}</td>
                  <td className="px-2 py-1.5 text-right tabular-nums">
                    {row.count.toLocaleString("en")} of {result.replicates.toLocaleString("en")}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
        {q.shareBelowAtHorizon !== q.share && (
          <p className="text-sm text-ink/85">
            At the end of the Run, {formatProbability(q.shareBelowAtHorizon)} of the replicates are at or below the threshold; the others that touched it climbed back above it.
          </p>
        )}
      </Section>

      <Section
        id="risk-growth"
        title="Stochastic growth rate λs"
        help="How fast a population grows in the long run when its rates vary from year to year. It is lower than λ of the average matrix because bad years cost more than good years give."
      >
        <dl className="grid gap-3 md:grid-cols-2">
          <Figure
            label="By simulation"
            value={sim ? `λs = ${formatLambda(sim.lambdaS)}` : "not available"}
            detail={
              sim
                ? `log λs = ${formatNumber(sim.logLambdaS, 4)} (95 % CI ${formatNumber(sim.lower, 4)} to ${formatNumber(sim.upper, 4)}), from ${sim.replicatesUsed.toLocaleString("en")} replicates over ${pluralOf(unit)} ${sim.burnIn} to ${T}`
                : why("growthRate.simulated")
            }
            help={`The average yearly log growth along each simulated future, after the first ${sim ? timeSpan(sim.burnIn, unit) : "years"} (burn-in, while the stage mix settles); the interval comes from the spread between replicates.`}
          />
          <Figure
            label="Tuljapurkar’s approximation"
            value={approx ? `λs ≈ ${formatLambda(approx.lambdaS)}` : "not available"}
            detail={
              approx
                ? `log λs ≈ log λ̄ − τ²/(2λ̄²) = ${formatNumber(approx.logLambdaS, 4)}; λ̄ = ${formatLambda(approx.lambdaMean)}, τ² = ${formatNumber(approx.tau2, 3)}${approx.standardError > 0 ? `; sampling SE of log λs ${formatNumber(approx.standardError, 2)}` : ""}`
                : why("growthRate.approximation")
            }
            help="A formula (Tuljapurkar 1982) from the average matrix λ̄ and the year-to-year variance of the entries, weighted by their sensitivities (τ²). It assumes small, independent year-to-year variation."
          />
        </dl>
      </Section>

      <Section
        id="risk-final"
        title={`Abundance at the end (${unit} ${T})`}
        help={`How many individuals the simulated futures end with. The bars group futures by their final total on a log scale, so each bar spans the same ratio; the first bar counts the futures with no individuals left.`}
      >
        <dl className="grid gap-3 sm:grid-cols-2 xl:grid-cols-4">
          <Figure label="Mean ± SD" value={formatCount(fa.mean)} detail={`SD ${formatCount(fa.sd)}`} help="Pulled up by a few futures that grow large; the median is often more typical." />
          <Figure label="Median" value={median ? `${censored(median)}${formatCount(median.value)}` : "—"} help="Half of the futures end below this, half above." />
          <Figure
            label="95 % of futures end between"
            value={lo && hi ? `${censored(lo)}${formatCount(lo.value)} – ${censored(hi)}${formatCount(hi.value)}` : "—"}
            help="The 2.5 % and 97.5 % points of the final totals."
          />
          <Figure
            label="None left"
            value={fa.zeroCount.toLocaleString("en")}
            detail={`${formatProbability(result.replicates > 0 ? fa.zeroCount / result.replicates : 0)} of the replicates`}
            help="Futures that end with exactly 0 individuals (only possible with demographic stochasticity or a rate drawn as 0)."
          />
        </dl>
        {chart(
          <FinalAbundanceChart
            edges={fa.histogram.edges}
            counts={fa.histogram.counts}
            zeroCount={fa.zeroCount}
            belowRange={fa.histogram.belowRange}
            aboveRange={fa.histogram.aboveRange}
            replicates={result.replicates}
            when={`${unit} ${T}`}
            ariaLabel={`Bar chart of the number of replicates by total individuals at ${unit} ${T}, on log-spaced bins, with a first bar for replicates with none left (${fa.zeroCount}).`}
          />,
        )}
      </Section>

      <Section id="risk-abundance" title="Mean abundance over time" help="The mean total over all simulated futures each year, with a band of one standard deviation either side (cut at zero).">
        {chart(
          <AbundanceChart
            mean={result.abundance.mean}
            sd={result.abundance.sd}
            timeStepUnit={unit}
            threshold={threshold.stages === null ? threshold.value : null}
            ariaLabel={`Line chart of the mean total abundance over ${timeSpan(T, unit)} with a band of ± 1 SD.`}
          />,
        )}
      </Section>

      <Section
        id="risk-criterion-e"
        title="IUCN Red List criterion E"
        help="Criterion E compares a quantitative analysis’s probability of extinction with thresholds for each category. Here the probabilities are of quasi-extinction at the threshold of this Run."
      >
        <CriterionETable assessment={result.criterionE} runYears={T} timeStepUnit={unit} />
      </Section>
    </div>
  );
}
