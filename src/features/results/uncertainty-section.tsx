/**
 * How sure the results are, from the rates' uncertainty by the delta method
 * (computed with every analysis): λ's interval and P(λ < 1) for the headline,
 * and a section with R0 and the generation times, and each rate's share of
 * the variance of λ.
 */
import type { DeltaEstimate, DeltaMethodResult } from "../../../shared/uncertainty";
import { formatLambda, formatNumber, formatPercent } from "../../lib/number-format";

/** P as a percentage, with "< 0.1 %" and "> 99.9 %" at the ends. */
export function formatChance(p: number): string {
  if (p < 0.001) return "< 0.1 %";
  if (p > 0.999) return "> 99.9 %";
  return formatPercent(p);
}

/** The headline's second line: λ's interval and the chance that it is below 1. */
export function LambdaInterval({ uncertainty }: { uncertainty: DeltaMethodResult | null }) {
  const l = uncertainty?.lambda;
  if (!l) return null;
  return (
    <p className="mt-1 text-lg tabular-nums" data-testid="lambda-interval">
      {formatNumber(uncertainty.level * 100, 3)} % interval {formatLambda(l.lower)}–{formatLambda(l.upper)}
      <span aria-hidden="true"> · </span>
      <span className="sr-only">; </span>
      <span data-testid="lambda-below-one">P(λ &lt; 1) = {formatChance(l.probabilityBelowOne)}</span>
    </p>
  );
}

function Row({ label, unit, e }: { label: string; unit?: string; e: DeltaEstimate | null }) {
  return (
    <tr className="border-b border-ink/10">
      <th scope="row" className="px-2 py-1.5 text-left font-normal">
        {label}
      </th>
      {e ? (
        <>
          <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(e.estimate, 4)}</td>
          <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(e.se, 2)}</td>
          <td className="px-2 py-1.5 text-right tabular-nums">
            {formatNumber(e.lower, 4)} to {formatNumber(e.upper, 4)}
            {unit && <span className="text-ink/70"> {unit}</span>}
          </td>
        </>
      ) : (
        <td colSpan={3} className="px-2 py-1.5 text-ink/70">
          not defined here
        </td>
      )}
    </tr>
  );
}

const SOURCE_WORDS = { se: "SE", ci: "CI", counts: "counts", distribution: "distribution" } as const;

export function UncertaintySection({ uncertainty, units }: { uncertainty: DeltaMethodResult | null; units: string }) {
  if (uncertainty === null) {
    return (
      <p className="max-w-3xl text-sm text-ink/80">
        No vital rate carries its uncertainty yet. Give an SE, a confidence interval, counts (k of n) or a distribution on the Rates tab and λ gets an interval and the chance
        that it is below 1.
      </p>
    );
  }
  const u = uncertainty;
  const level = `${formatNumber(u.level * 100, 3)} %`;
  return (
    <div className="space-y-4">
      {u.issues.length > 0 && (
        <ul className="space-y-1 text-sm" aria-label="Problems with the rates' uncertainty">
          {u.issues.map((issue, k) => (
            <li key={k}>
              <span aria-hidden="true" className={`font-bold ${issue.severity === "error" ? "text-brick" : "text-ochre"}`}>
                {issue.severity === "error" ? "✕ " : "! "}
              </span>
              {issue.message}
            </li>
          ))}
        </ul>
      )}
      {u.lambda === null ? (
        <p className="text-sm">{u.reason}</p>
      ) : (
        <>
          <table className="border-collapse text-sm">
            <caption className="sr-only">Delta-method intervals</caption>
            <thead>
              <tr className="border-b-2 border-ink/20">
                <th scope="col" className="px-2 py-1.5 text-left">Result</th>
                <th scope="col" className="px-2 py-1.5 text-right">Estimate</th>
                <th scope="col" className="px-2 py-1.5 text-right">SE</th>
                <th scope="col" className="px-2 py-1.5 text-right">{level} interval</th>
              </tr>
            </thead>
            <tbody>
              <Row label="λ" e={u.lambda} />
              <Row label="Net reproductive rate R0" e={u.netReproductiveRate} />
              <Row label="Generation time (ln R0 / ln λ)" unit={units} e={u.generationTimeR0} />
              <Row label="Generation time (mean age of parents)" unit={units} e={u.meanAgeOfParents} />
            </tbody>
          </table>
          <p className="max-w-3xl text-sm">
            The chance that λ is below 1 — that the population is declining — is <strong className="tabular-nums">{formatChance(u.lambda.probabilityBelowOne)}</strong>, given
            the uncertainty of the rates alone (not of the model's structure or of future years).
          </p>
          <div className="space-y-2">
            <h4 className="font-bold">Where the uncertainty of λ comes from</h4>
            <table className="border-collapse text-sm">
              <caption className="sr-only">Each rate's share of the variance of λ</caption>
              <thead>
                <tr className="border-b-2 border-ink/20">
                  <th scope="col" className="px-2 py-1.5 text-left">Rate</th>
                  <th scope="col" className="px-2 py-1.5 text-left">From</th>
                  <th scope="col" className="px-2 py-1.5 text-right">Value ± SD</th>
                  <th scope="col" className="px-2 py-1.5 text-right">∂λ/∂x</th>
                  <th scope="col" className="px-2 py-1.5 text-left">Share of Var(λ)</th>
                </tr>
              </thead>
              <tbody>
                {u.contributions.map((c) => (
                  <tr key={c.rateId} className="border-b border-ink/10">
                    <th scope="row" className="px-2 py-1.5 text-left font-normal">
                      <code>{c.name}</code>
                    </th>
                    <td className="px-2 py-1.5">{SOURCE_WORDS[c.source]}</td>
                    <td className="px-2 py-1.5 text-right tabular-nums">
                      {formatNumber(c.value, 4)} ± {formatNumber(c.sd, 2)}
                    </td>
                    <td className="px-2 py-1.5 text-right tabular-nums">{formatNumber(c.sensitivity, 3)}</td>
                    <td className="px-2 py-1.5">
                      <div className="flex items-center gap-2">
                        <div className="h-2.5 w-32 overflow-hidden rounded bg-ink/10" aria-hidden="true">
                          <div className="h-full bg-spruce" style={{ width: `${Math.max(0, Math.min(1, c.varianceShare)) * 100}%` }} />
                        </div>
                        <span className="tabular-nums">{formatPercent(c.varianceShare)}</span>
                      </div>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
            {u.ratesWithoutUncertainty.length > 0 && (
              <p className="max-w-3xl text-sm text-ink/80">
                Treated as exact (no uncertainty given): {u.ratesWithoutUncertainty.map((n, k) => [k > 0 && ", ", <code key={n}>{n}</code>])}. The intervals are too narrow if
                these are estimates too.
              </p>
            )}
          </div>
        </>
      )}
      <p className="max-w-3xl text-sm text-ink/80">
        These intervals come from the delta method: a first-order approximation, Var(λ) ≈ Σ Cov(x_i, x_j) ∂λ/∂x_i ∂λ/∂x_j, that assumes λ is roughly normal. With large SEs
        or rates near 0 or 1, check them with a Monte Carlo Run on the Uncertainty tab, which also shows how stable the ranking of levers is.
      </p>
    </div>
  );
}
