/**
 * A finished Monte Carlo Run: λ's percentile interval and P(λ < 1), the
 * histogram, intervals of R0 and the generation times, how stable the
 * ranking of levers is, and w and v by stage.
 */
import { useState, type ReactNode } from "react";
import type { ItemSummary } from "../../../shared/uncertainty";
import type { UncertaintyRunResult } from "../../api/runs";
import { formatLambda, formatNumber, formatPercent } from "../../lib/number-format";

const chance = (p: number) => (p < 0.001 ? "< 0.1 %" : p > 0.999 ? "> 99.9 %" : formatPercent(p));

/** How robust the top lever is, in words. */
export function stabilityVerdict(share: number): string {
  if (share >= 0.95) return "robust: it stays first whatever the uncertainty of the rates";
  if (share >= 0.75) return "fairly robust, though another lever comes first in some draws";
  return "not robust: what we do not know about the rates could change which lever is best";
}

function Interval({ s, digits = 4 }: { s: ItemSummary; digits?: number }) {
  return (
    <span className="tabular-nums">
      {formatNumber(s.lower, digits)} to {formatNumber(s.upper, digits)}
    </span>
  );
}

export function UncertaintyResults({ result: r, histogram }: { result: UncertaintyRunResult; histogram: ReactNode }) {
  const [allEntries, setAllEntries] = useState(false);
  const unit = r.timeStepUnit;
  const top = r.rateLevers[0];
  const firstMost = [...r.rateLevers].sort((a, b) => b.rankFirst - a.rankFirst)[0];
  const level = `${formatNumber(r.level * 100, 3)} %`;
  const entries = allEntries ? r.entryLevers : r.entryLevers.slice(0, 8);
  const scalar = (label: string, s: ItemSummary, at: number | null, unitText?: string) => (
    <tr className="border-b border-ink/10">
      <th scope="row" className="px-2 py-1.5 text-left font-normal">
        {label}
      </th>
      <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(at, 4)}</td>
      <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(s.median, 4)}</td>
      <td className="px-2 py-1.5 text-right">
        <Interval s={s} />
        {unitText && <span className="text-ink/70"> {unitText}</span>}
      </td>
      <td className="px-2 py-1.5 text-right tabular-nums">{s.undefinedCount > 0 ? `${s.undefinedCount.toLocaleString("en")} draws` : "—"}</td>
    </tr>
  );

  return (
    <div className="space-y-6">
      <div className="space-y-1">
        <p className="text-2xl font-bold tabular-nums" data-testid="mc-lambda">
          λ {formatLambda(r.lambda.median)} <span className="text-lg font-normal">(median; {level} of draws between {formatLambda(r.lambda.lower)} and {formatLambda(r.lambda.upper)})</span>
        </p>
        <p className="text-lg" data-testid="mc-below-one">
          P(λ &lt; 1) = <strong className="tabular-nums">{chance(r.lambda.probabilityBelowOne)}</strong>{" "}
          <span className="text-base text-ink/80 tabular-nums">
            (95 % CI {formatPercent(r.lambda.probabilityBelowOneInterval.lower)}–{formatPercent(r.lambda.probabilityBelowOneInterval.upper)} from {r.draws.toLocaleString("en")} draws, seed {r.seed})
          </span>
        </p>
        <p className="max-w-3xl text-sm text-ink/80">
          Each draw takes every uncertain rate from its distribution (correlated where the Rates tab says so) and recomputes the life cycle. The share of draws with λ below 1 is
          the chance of decline given what we do not know about the rates — not the chance of chance events in future years, which the Risk tab simulates.
        </p>
      </div>

      <figure className="space-y-1">
        {histogram}
        <figcaption className="text-sm text-ink/80">Distribution of λ over the draws; the line marks λ = 1.</figcaption>
      </figure>

      <div className="space-y-2">
        <h4 className="font-bold">Headline results</h4>
        <table className="border-collapse text-sm">
          <caption className="sr-only">Percentile intervals of the headline results</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-1.5 text-left">Result</th>
              <th scope="col" className="px-2 py-1.5 text-right">At the rates’ values</th>
              <th scope="col" className="px-2 py-1.5 text-right">Median</th>
              <th scope="col" className="px-2 py-1.5 text-right">{level} of draws</th>
              <th scope="col" className="px-2 py-1.5 text-right">Not defined in</th>
            </tr>
          </thead>
          <tbody>
            {scalar("λ", r.lambda, r.atValues.lambda)}
            {scalar("Net reproductive rate R0", r.netReproductiveRate, r.atValues.netReproductiveRate)}
            {scalar("Generation time (ln R0 / ln λ)", r.generationTimeR0, r.atValues.generationTimeR0, `${unit}s`)}
            {scalar("Generation time (mean age of parents)", r.meanAgeOfParents, r.atValues.meanAgeOfParents, `${unit}s`)}
          </tbody>
        </table>
        {r.generationTimeR0.undefinedCount > 0 && <p className="text-sm text-ink/80">ln R0 / ln λ is not defined in draws where λ is 1 or R0 and λ fall on opposite sides of 1.</p>}
      </div>

      <div className="space-y-2">
        <h4 className="font-bold">Is the top lever robust?</h4>
        {top && firstMost && (
          <p className="max-w-3xl" data-testid="rank-stability-verdict">
            At the rates’ values the largest elasticity is <code className="font-bold">{top.name}</code>’s. It ranks first in{" "}
            <strong className="tabular-nums">{formatPercent(top.rankFirst)}</strong> of the draws — {stabilityVerdict(top.rankFirst)}.
            {firstMost.rateId !== top.rateId && (
              <>
                {" "}
                <code className="font-bold">{firstMost.name}</code> ranks first more often ({formatPercent(firstMost.rankFirst)}).
              </>
            )}
          </p>
        )}
        <table className="border-collapse text-sm">
          <caption className="sr-only">Elasticity of λ to each vital rate and how often it ranks first</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-1.5 text-left">Vital rate</th>
              <th scope="col" className="px-2 py-1.5 text-right">Elasticity at the values</th>
              <th scope="col" className="px-2 py-1.5 text-right">{level} of draws</th>
              <th scope="col" className="px-2 py-1.5 text-left">Ranked first</th>
              <th scope="col" className="px-2 py-1.5 text-right">In the top three</th>
            </tr>
          </thead>
          <tbody>
            {r.rateLevers.map((l) => (
              <tr key={l.rateId} className="border-b border-ink/10">
                <th scope="row" className="px-2 py-1.5 text-left font-normal">
                  <code>{l.name}</code>
                </th>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(l.elasticityAtValue, 3)}</td>
                <td className="px-2 py-1.5 text-right">
                  <Interval s={l.elasticity} digits={3} />
                </td>
                <td className="px-2 py-1.5">
                  <div className="flex items-center gap-2">
                    <div className="h-2.5 w-28 overflow-hidden rounded bg-ink/10" aria-hidden="true">
                      <div className="h-full bg-indigo" style={{ width: `${l.rankFirst * 100}%` }} />
                    </div>
                    <span className="tabular-nums">{formatPercent(l.rankFirst)}</span>
                  </div>
                </td>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatPercent(l.topThree)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="max-w-3xl text-sm text-ink/80">
          Levers are ranked in each draw by the size of their elasticity (the proportional effect of a change on λ). Elasticities say nothing of what a change costs or whether it
          can be made; the Levers tab weighs those.
        </p>
      </div>

      <details className="space-y-2">
        <summary className="cursor-pointer font-bold">Matrix entries: elasticity and rank stability</summary>
        <table className="mt-2 border-collapse text-sm">
          <caption className="sr-only">Elasticity of λ to each non-zero matrix entry</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-1.5 text-left">Entry (from → to)</th>
              <th scope="col" className="px-2 py-1.5 text-right">Elasticity at the values</th>
              <th scope="col" className="px-2 py-1.5 text-right">{level} of draws</th>
              <th scope="col" className="px-2 py-1.5 text-right">Ranked first</th>
              <th scope="col" className="px-2 py-1.5 text-right">In the top three</th>
            </tr>
          </thead>
          <tbody>
            {entries.map((l) => (
              <tr key={`${l.from}-${l.to}`} className="border-b border-ink/10">
                <th scope="row" className="px-2 py-1.5 text-left font-normal">
                  {l.fromName} → {l.toName}
                </th>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(l.elasticityAtValue, 3)}</td>
                <td className="px-2 py-1.5 text-right">
                  <Interval s={l.elasticity} digits={3} />
                </td>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatPercent(l.rankFirst)}</td>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatPercent(l.topThree)}</td>
              </tr>
            ))}
          </tbody>
        </table>
        {r.entryLevers.length > 8 && (
          <button type="button" className="text-sm font-bold text-indigo underline-offset-2 hover:underline" onClick={() => setAllEntries((v) => !v)}>
            {allEntries ? "Show the top 8" : `Show all ${r.entryLevers.length} entries`}
          </button>
        )}
      </details>

      <details className="space-y-2">
        <summary className="cursor-pointer font-bold">Stable stage distribution and reproductive values by stage</summary>
        <table className="mt-2 border-collapse text-sm">
          <caption className="sr-only">Percentile intervals of w and v by stage</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-1.5 text-left">Stage</th>
              <th scope="col" className="px-2 py-1.5 text-right">Share w, median</th>
              <th scope="col" className="px-2 py-1.5 text-right">{level} of draws</th>
              <th scope="col" className="px-2 py-1.5 text-right">Reproductive value v, median</th>
              <th scope="col" className="px-2 py-1.5 text-right">{level} of draws</th>
            </tr>
          </thead>
          <tbody>
            {r.stages.map((s) => (
              <tr key={s.id} className="border-b border-ink/10">
                <th scope="row" className="px-2 py-1.5 text-left font-normal">
                  {s.name}
                </th>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(s.w.median, 3)}</td>
                <td className="px-2 py-1.5 text-right">
                  <Interval s={s.w} digits={3} />
                </td>
                <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(s.v.median, 3)}</td>
                <td className="px-2 py-1.5 text-right">
                  <Interval s={s.v} digits={3} />
                </td>
              </tr>
            ))}
          </tbody>
        </table>
        <p className="text-sm text-ink/80">Reproductive values are relative to the first stage (v = 1 there). Percentiles of w, v and elasticities come from histograms with 0.23 % bins.</p>
      </details>
    </div>
  );
}
