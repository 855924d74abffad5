/**
 * LTRE (fixed design) between this life cycle and another of the Study with
 * the same stages: how much each matrix entry, and each vital rate where the
 * two share their formulas, contributed to the difference in λ — a heatmap, a
 * bar chart, and the sum beside the exact difference.
 */
import { useQuery } from "@tanstack/react-query";
import { Suspense, useState } from "react";
import { useLtre } from "../../api/levers";
import { lifeCycleQueryOptions, useLifeCycles } from "../../api/life-cycles";
import { Alert } from "../../components/ui/alert";
import { SelectField } from "../../components/ui/field";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { formatLambda, formatNumber, formatPercent } from "../../lib/number-format";
import { ContributionBars, ContributionHeatmap } from "./lazy-charts";
import { ChartFallback, Section } from "./section";
import type { LeversPanelProps } from "./types";

const signed = (x: number, digits = 4) => (x > 0 ? "+" : x < 0 ? "−" : "") + formatNumber(Math.abs(x), digits);

export function LtreSection({ lifeCycleId, studyId, revision, document: doc }: LeversPanelProps) {
  const list = useLifeCycles(studyId);
  const [otherId, setOtherId] = useState<string | null>(null);
  const other = useQuery({ ...lifeCycleQueryOptions(otherId ?? ""), enabled: otherId !== null });
  const ltre = useLtre(lifeCycleId, revision, doc, otherId, other.data?.document);
  const others = (list.data ?? []).filter((l) => l.id !== lifeCycleId);
  const data = ltre.data;

  const entries: { label: string; value: number }[] = [];
  if (data) {
    data.contributions.forEach((row, i) => row.forEach((c, j) => c !== 0 && entries.push({ label: `${data.stageNames[j]} → ${data.stageNames[i]}`, value: c })));
    entries.sort((p, q) => Math.abs(q.value) - Math.abs(p.value));
  }
  const rates = data?.rates ? [...data.rates].filter((r) => r.contribution !== 0).sort((p, q) => Math.abs(q.contribution) - Math.abs(p.contribution)) : null;

  return (
    <Section
      id="levers-ltre"
      title="What made two life cycles differ (LTRE)"
      help={
        <>
          <p>
            A fixed-design life-table response experiment splits the difference in λ between two life cycles with the same stages — two sites, two periods, treated
            and control — into the contribution of each matrix entry (its difference times the sensitivity of λ at the matrix halfway between them), and of each vital
            rate when both build their arrows from the same formulas. The contributions add up to the difference only approximately; the error is shown.
          </p>
          <p className="font-bold">An LTRE explains a difference that already happened. It does not by itself say which action would help: use the ranking and scenarios above for that.</p>
        </>
      }
    >
      {list.error ? (
        <QueryError error={list.error} what="the Study's life cycles" />
      ) : others.length === 0 ? (
        <p className="text-sm text-ink/80">This Study has no other life cycle to compare with. Duplicate this one or add another with the same stages.</p>
      ) : (
        <SelectField label="Compare with" value={otherId ?? ""} onChange={(e) => setOtherId(e.target.value === "" ? null : e.target.value)} fieldClassName="max-w-md" description="This life cycle (as shown in the editor) is the reference; the other is compared with it.">
          <option value="">Choose a life cycle of this Study…</option>
          {others.map((l) => (
            <option key={l.id} value={l.id}>
              {l.name}
            </option>
          ))}
        </SelectField>
      )}
      {otherId === null ? null : other.error ? (
        <QueryError error={other.error} what="the other life cycle" />
      ) : ltre.error ? (
        <Alert tone="error" title="These two life cycles cannot be compared.">
          <p>{ltre.error.message}</p>
        </Alert>
      ) : !data ? (
        <Loading label="Decomposing the difference…" />
      ) : (
        <div className="space-y-4" data-testid="levers-ltre">
          <dl className="grid gap-3 sm:grid-cols-4">
            {[
              [`λ of ${data.referenceName}`, formatLambda(data.lambdaReference)],
              [`λ of ${data.comparisonName}`, formatLambda(data.lambdaComparison)],
              ["Exact difference Δλ", signed(data.deltaLambda)],
              [
                "Sum of contributions",
                `${signed(data.total)} (error ${signed(data.error, 2)}${data.relativeError === null ? "" : `, ${formatPercent(data.relativeError, 2)}`})`,
              ],
            ].map(([label, value]) => (
              <div key={label} className="rounded-md border border-ink/15 bg-white p-3">
                <dt className="text-sm font-bold">{label}</dt>
                <dd className="mt-1 text-lg font-bold tabular-nums">{value}</dd>
              </div>
            ))}
          </dl>
          {data.deltaLambda === 0 && <p className="text-sm">The two life cycles have the same λ: there is no difference to explain.</p>}
          <Suspense fallback={<ChartFallback />}>
            {data.stageNames.length <= 40 && (
              <ContributionHeatmap
                stageNames={data.stageNames}
                contributions={data.contributions}
                ariaLabel="Heatmap of each matrix entry's contribution to the difference in λ: clay negative, spruce positive, blank where the entries do not differ."
              />
            )}
            {rates && rates.length > 0 ? (
              <>
                <h4 className="font-bold">By vital rate (sum {signed(data.ratesTotal ?? 0)})</h4>
                <ContributionBars labels={rates.map((r) => r.name)} values={rates.map((r) => r.contribution)} ariaLabel="Each vital rate's contribution to the difference in λ." />
                <table className="w-full max-w-3xl border-collapse text-left text-sm">
                  <caption className="sr-only">Vital-rate contributions</caption>
                  <thead>
                    <tr className="border-b-2 border-ink/20">
                      {["Vital rate", data.referenceName, data.comparisonName, "Sensitivity at the midpoint", "Contribution"].map((h) => (
                        <th key={h} scope="col" className="px-2 py-1">
                          {h}
                        </th>
                      ))}
                    </tr>
                  </thead>
                  <tbody>
                    {rates.map((r) => (
                      <tr key={r.name} className="border-b border-ink/10">
                        <th scope="row" className="px-2 py-1 text-left font-bold">
                          {r.name}
                        </th>
                        <td className="px-2 py-1 tabular-nums">{formatNumber(r.reference, 4)}</td>
                        <td className="px-2 py-1 tabular-nums">{formatNumber(r.comparison, 4)}</td>
                        <td className="px-2 py-1 tabular-nums">{formatNumber(r.sensitivity, 4)}</td>
                        <td className="px-2 py-1 tabular-nums">{signed(r.contribution)}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </>
            ) : (
              <>
                {data.rateNote && <p className="text-sm text-ink/80">{data.rateNote}</p>}
                {entries.length > 0 && <ContributionBars labels={entries.slice(0, 30).map((e) => e.label)} values={entries.slice(0, 30).map((e) => e.value)} ariaLabel="Each matrix entry's contribution to the difference in λ." />}
              </>
            )}
          </Suspense>
        </div>
      )}
    </Section>
  );
}
