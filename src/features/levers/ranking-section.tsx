/**
 * Lever ranking: every vital rate and non-zero matrix entry, with the exact
 * change in λ from the same relative change up and down, beside its
 * sensitivity and elasticity, the change the team thinks achievable, and a
 * tornado chart of the largest effects. Plain words explain why an
 * elasticity ranking and an achievable-change ranking can disagree.
 */
import { Suspense, useState, type ReactNode } from "react";
import type { LeverRow } from "../../../shared/levers";
import type { LeversResponse } from "../../api/levers";
import { SelectField } from "../../components/ui/field";
import { formatNumber } from "../../lib/number-format";
import { opText } from "./scenario-edits";
import { Tornado } from "./lazy-charts";
import { ChartFallback, Section } from "./section";
import type { RankStability } from "./rank-stability";

type RankBy = "exact" | "elasticity" | "achievable";

/** Levers in the tornado chart. */
const TORNADO_MAX = 15;

const signed = (x: number | null) => (x === null ? "—" : (x > 0 ? "+" : x < 0 ? "−" : "") + formatNumber(Math.abs(x), 3));

function key(row: LeverRow, by: RankBy): number {
  if (by === "elasticity") return Math.abs(row.elasticity);
  if (by === "achievable") return row.achievable?.deltaLambda ?? -Infinity;
  return Math.max(Math.abs(row.increase.deltaLambda ?? 0), Math.abs(row.decrease.deltaLambda ?? 0));
}

function limited(step: LeverRow["increase"], row: LeverRow): ReactNode {
  if (step.limitedBy === null) return null;
  const bound = step.limitedBy === "upper" ? row.upper : row.lower;
  return (
    <span className="block text-xs text-ochre">
      ! stops at {formatNumber(bound, 4)}
      {step.limitedBy === "upper" && row.upperReason ? ` (${row.upperReason})` : ""}
    </span>
  );
}

export function RankingSection({ data, relativeChange, control, stability = null }: { data: LeversResponse; relativeChange: number; control: ReactNode; stability?: RankStability | null }) {
  const firstShare = (r: LeverRow) => {
    if (!stability) return null;
    const s = r.kind === "rate" && r.rateId ? stability.rate(r.rateId) : r.from && r.to ? stability.entry(r.from, r.to) : undefined;
    return s ? `${formatNumber(s.rankFirst * 100, 3)} %` : "—";
  };
  const [by, setBy] = useState<RankBy>("exact");
  const [show, setShow] = useState<"all" | "rate" | "entry">("all");
  const percent = `${formatNumber(relativeChange * 100, 4)} %`;
  const rows = data.ranking.rows.filter((r) => show === "all" || r.kind === show);
  const hasAchievable = rows.some((r) => r.achievable !== null);
  const sorted = [...rows].filter((r) => by !== "achievable" || r.achievable !== null).sort((p, q) => key(q, by) - key(p, by));
  const tornado = [...rows]
    .filter((r) => r.increase.deltaLambda !== null || r.decrease.deltaLambda !== null)
    .sort((p, q) => key(q, "exact") - key(p, "exact"))
    .slice(0, TORNADO_MAX)
    .map((r) => ({ label: r.kind === "rate" ? r.label : `${r.label} (entry)`, down: r.decrease.deltaLambda, up: r.increase.deltaLambda }));

  return (
    <Section
      id="levers-ranking"
      title="Lever ranking"
      help={
        <>
          <p>
            For each vital rate and each non-zero matrix entry: the exact change in λ when that one lever moves by {percent} up or down (λ recomputed on the changed
            model), its sensitivity (change in λ per unit of the lever) and elasticity (proportional change in λ per proportional change of the lever). A probability
            cannot pass 1, so some changes stop at their bound.
          </p>
          <details className="rounded-md border border-ink/15 bg-white px-3 py-2">
            <summary className="cursor-pointer font-bold">Why elasticity and achievable change can disagree</summary>
            <p className="mt-2">
              Elasticity ranks levers by what the same <em>proportional</em> change would do. Real actions do not move every rate by the same proportion: raising adult
              survival from 0.90 by 10 % is nearly impossible (it would reach 0.99), while doubling egg survival with nest protection may be easy. A lever with a large
              elasticity can therefore lose to a lever with a small elasticity that can be moved much further, or much more cheaply. Enter in a scenario the largest
              change your team thinks achievable, and rank by that; scenarios with costs are also ranked per unit of cost in the comparison above.
            </p>
          </details>
        </>
      }
    >
      <div className="flex flex-wrap items-end gap-4">
        {control}
        <SelectField label="Rank by" value={by} onChange={(e) => setBy(e.target.value as RankBy)} fieldClassName="w-72">
          <option value="exact">Exact change in λ (±{percent})</option>
          <option value="elasticity">Elasticity</option>
          <option value="achievable" disabled={!hasAchievable}>
            Achievable change{hasAchievable ? "" : " (none entered in a scenario)"}
          </option>
        </SelectField>
        <SelectField label="Show" value={show} onChange={(e) => setShow(e.target.value as "all" | "rate" | "entry")} fieldClassName="w-56">
          <option value="all">Vital rates and entries</option>
          <option value="rate">Vital rates only</option>
          <option value="entry">Matrix entries only</option>
        </SelectField>
      </div>
      <div className="max-h-[36rem] overflow-auto">
        <table className="w-full border-collapse text-left text-sm" data-testid="levers-ranking">
          <caption className="sr-only">Levers ranked by {by === "exact" ? "the exact change in λ" : by === "elasticity" ? "elasticity" : "the achievable change"}</caption>
          <thead className="sticky top-0 bg-paper">
            <tr className="border-b-2 border-ink/20">
              {["Rank", "Lever", "Value", "Sensitivity", "Elasticity", `Δλ +${percent}`, `Δλ −${percent}`, `First-order +${percent}`, "Achievable change → Δλ", ...(stability ? ["Ranked first (Monte Carlo)"] : [])].map((h) => (
                <th key={h} scope="col" className="px-2 py-2 whitespace-nowrap">
                  {h}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {sorted.map((r, k) => (
              <tr key={r.key} className="border-b border-ink/10 align-top" data-lever={r.label}>
                <td className="px-2 py-1 tabular-nums">{k + 1}</td>
                <th scope="row" className="px-2 py-1 text-left">
                  <span className="font-bold">{r.label}</span>
                  <span className="block text-xs font-normal text-ink/75">{r.kind === "rate" ? `vital rate, ${r.scale}` : "matrix entry"}</span>
                  {r.note && <span className="block max-w-64 text-xs font-normal text-ink/75">{r.note}</span>}
                </th>
                <td className="px-2 py-1 tabular-nums">{formatNumber(r.value, 4)}</td>
                <td className="px-2 py-1 tabular-nums">{formatNumber(r.sensitivity, 4)}</td>
                <td className="px-2 py-1 tabular-nums">{formatNumber(r.elasticity, 4)}</td>
                <td className="px-2 py-1 tabular-nums" data-col="up">
                  {signed(r.increase.deltaLambda)}
                  {limited(r.increase, r)}
                </td>
                <td className="px-2 py-1 tabular-nums">
                  {signed(r.decrease.deltaLambda)}
                  {limited(r.decrease, r)}
                </td>
                <td className="px-2 py-1 tabular-nums text-ink/80">{signed(r.increase.firstOrder)}</td>
                <td className="px-2 py-1">
                  {r.achievable ? (
                    <>
                      <span className="tabular-nums">
                        {opText(r.achievable.op, r.achievable.achievable)} → {signed(r.achievable.deltaLambda)}
                      </span>
                      <span className="block text-xs text-ink/75">from “{r.achievable.scenarioName}”</span>
                      {limited(r.achievable, r)}
                    </>
                  ) : (
                    "—"
                  )}
                </td>
                {stability && (
                  <td className="px-2 py-1 tabular-nums" data-col="rank-first">
                    {firstShare(r)}
                  </td>
                )}
              </tr>
            ))}
          </tbody>
        </table>
      </div>
      {stability && (
        <p className="text-sm text-ink/80" data-testid="levers-rank-stability-note">
          Ranked first (Monte Carlo): the share of the {stability.draws.toLocaleString("en")} draws of the newest uncertainty Run (life-cycle version {stability.version}) in which
          the lever had the largest elasticity in size — how robust its place is to what we do not know about the rates. See the Uncertainty tab.
        </p>
      )}
      {tornado.length > 0 && (
        <Suspense fallback={<ChartFallback />}>
          <Tornado rows={tornado} percent={percent} ariaLabel={`Tornado chart: exact change in λ when each of the ${tornado.length} most influential levers moves ${percent} down or up.`} />
        </Suspense>
      )}
    </Section>
  );
}
