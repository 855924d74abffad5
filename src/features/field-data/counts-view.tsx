/**
 * Counts analysis of one dataset: per site, the counts and the growth ratio
 * of each interval, the geometric-mean λ, μ and σ² of the diffusion
 * approximation with their intervals, and the probability of falling to a
 * chosen threshold by each horizon.
 */
import { lazy, Suspense, useEffect, useState } from "react";
import { type CountsAnalysis, type DatasetSummary, type SiteSeries, useCountsAnalysis } from "../../api/field-data";
import { Alert } from "../../components/ui/alert";
import { Section } from "../../components/ui/layout";
import { TextField } from "../../components/ui/field";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { formatLambda, formatNumber } from "../../lib/number-format";

const Charts = {
  CountsChart: lazy(() => import("./field-data-charts").then((m) => ({ default: m.CountsChart }))),
  RatioChart: lazy(() => import("./field-data-charts").then((m) => ({ default: m.RatioChart }))),
  RiskCurveChart: lazy(() => import("./field-data-charts").then((m) => ({ default: m.RiskCurveChart }))),
};

export const CAUTION =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

const TABLE_HORIZONS = [1, 2, 5, 10, 20, 25, 50, 75, 100, 150, 200];
const pct = (p: number) => `${formatNumber(p * 100, 3)} %`;

function ParametersTable({ a }: { a: CountsAnalysis }) {
  const level = `${Math.round(a.level * 100)} %`;
  const rows: [string, string, string][] = [
    ["Usable intervals (q)", String(a.q), `${formatNumber(a.totalTime, 4)} years in all`],
    ["Geometric-mean λ per year", a.geometricMeanLambda === null ? "—" : formatLambda(a.geometricMeanLambda), "exp(μ̂): the typical yearly growth factor"],
    ["μ̂ (mean log growth per year)", formatNumber(a.mu, 4), a.muCi ? `${level} CI ${formatNumber(a.muCi.lower, 4)} to ${formatNumber(a.muCi.upper, 4)} (t, ${a.q - 1} df)` : "no interval"],
    ["σ̂² (variance of log growth per year)", formatNumber(a.sigma2, 4), a.sigma2Ci ? `${level} CI ${formatNumber(a.sigma2Ci.lower, 4)} to ${formatNumber(a.sigma2Ci.upper, 4)} (χ², ${a.q - 1} df)` : "no interval"],
  ];
  return (
    <table className="w-full text-sm">
      <caption className="sr-only">Growth parameters</caption>
      <tbody>
        {rows.map(([k, v, note]) => (
          <tr key={k} className="border-t border-ink/10">
            <th scope="row" className="py-1.5 pr-3 text-left font-bold">
              {k}
            </th>
            <td className="py-1.5 pr-3 tabular-nums">{v}</td>
            <td className="py-1.5 text-ink/75">{note}</td>
          </tr>
        ))}
      </tbody>
    </table>
  );
}

function SiteBlock({ s, stages }: { s: SiteSeries; stages: string[] }) {
  const a = s.analysis;
  const q = a.quasiExtinction;
  const title = s.site || "All counts";
  return (
    <Section title={title} headingLevel={3}>
      <div className="space-y-4">
        <Suspense fallback={<Loading label="Loading the chart…" />}>
          <Charts.CountsChart points={s.points} stages={stages} countLabel="count" ariaLabel={`Counts at ${title} by census year`} />
          {a.intervals.length > 0 && <Charts.RatioChart intervals={a.intervals} ariaLabel={`Growth ratio of each interval at ${title}`} />}
        </Suspense>
        {a.notes.map((n) => (
          <Alert key={n.code} tone={n.code === "missing-years" ? "info" : "warning"} live={false}>
            {n.message}
          </Alert>
        ))}
        <ParametersTable a={a} />
        {q && (
          <div className="space-y-2">
            <h4 className="font-bold">
              Probability of falling from {formatNumber(q.start, 4)} to {formatNumber(q.threshold, 4)} by each horizon
            </h4>
            <p className="text-sm text-ink/75">
              Diffusion approximation of Dennis et al. (1991) with μ̂ and σ̂²; the band is a parametric bootstrap of μ̂ and σ̂² ({q.replicates.toLocaleString("en")} draws, seed {q.seed}). Bands widen fast with the horizon: read them, not only the line.
            </p>
            <Suspense fallback={<Loading label="Loading the chart…" />}>
              <Charts.RiskCurveChart horizons={q.horizons} probability={q.probability} lower={q.lower} upper={q.upper} ariaLabel={`Probability of reaching ${q.threshold} at ${title}`} />
            </Suspense>
            <table className="w-full text-sm">
              <caption className="sr-only">Probability of reaching the threshold by horizon at {title}</caption>
              <thead className="text-left">
                <tr>
                  <th scope="col" className="py-1 pr-3">Horizon (years)</th>
                  <th scope="col" className="py-1 pr-3">Probability</th>
                  <th scope="col" className="py-1">95 % bootstrap interval</th>
                </tr>
              </thead>
              <tbody>
                {TABLE_HORIZONS.filter((h) => h <= q.horizons.length).map((h) => (
                  <tr key={h} className="border-t border-ink/10 tabular-nums">
                    <td className="py-1 pr-3">{h}</td>
                    <td className="py-1 pr-3">{pct(q.probability[h - 1]!)}</td>
                    <td className="py-1">
                      {pct(q.lower[h - 1]!)} – {pct(q.upper[h - 1]!)}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
        )}
      </div>
    </Section>
  );
}

export function CountsView({ dataset }: { dataset: DatasetSummary }) {
  const [threshold, setThreshold] = useState<string>("");
  const [horizon, setHorizon] = useState<string>("50");
  const t = Number(threshold);
  const h = Number(horizon);
  const thresholdOk = threshold.trim() !== "" && Number.isFinite(t) && t > 0;
  const horizonOk = Number.isInteger(h) && h >= 1 && h <= 200;
  const result = useCountsAnalysis(dataset.id, { threshold: thresholdOk ? t : undefined, maxHorizon: horizonOk ? h : 50 });

  // A first threshold: half the smallest last count, so the curve shows at once.
  useEffect(() => {
    if (threshold !== "" || !result.data) return;
    const last = result.data.sites.map((s) => s.points.at(-1)?.count ?? 0).filter((c) => c > 0);
    if (last.length) setThreshold(String(Math.max(1, Math.round(Math.min(...last) / 2))));
  }, [result.data, threshold]);

  return (
    <div className="space-y-4">
      <Section title="Growth and viability from counts" description="Ratios of successive counts, the diffusion approximation (Dennis, Munholland & Scott 1991) fitted by regression so unequal intervals and missing years are allowed, and the chance of falling to a quasi-extinction threshold.">
        <div className="grid gap-3 sm:grid-cols-2">
          <TextField label="Quasi-extinction threshold (count)" inputMode="decimal" value={threshold} onChange={(e) => setThreshold(e.target.value)} error={threshold !== "" && !thresholdOk ? "A count above zero." : undefined} description="Set it above zero: below some number a population is in trouble long before it reaches none." />
          <TextField label="Longest horizon (years)" inputMode="numeric" value={horizon} onChange={(e) => setHorizon(e.target.value)} error={!horizonOk ? "A whole number from 1 to 200." : undefined} />
        </div>
        <Alert tone="info" live={false} className="mt-3">
          {CAUTION}
        </Alert>
      </Section>
      {result.isPending && <Loading label="Analysing the counts…" />}
      {result.isError && <QueryError error={result.error} what="the counts analysis" onRetry={() => void result.refetch()} />}
      {result.data?.sites.map((s) => <SiteBlock key={s.site} s={s} stages={result.data.stages} />)}
    </div>
  );
}
