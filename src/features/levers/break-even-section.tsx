/**
 * Break-even values: for each vital rate, every value within its allowed
 * range at which λ reaches the target (1 unless the person sets another),
 * the others held as they are; "not reachable" with the λ range otherwise.
 */
import type { UseQueryResult } from "@tanstack/react-query";
import type { ReactNode } from "react";
import type { LeversResponse } from "../../api/levers";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { formatNumber, formatPercent } from "../../lib/number-format";
import { Section } from "./section";

export function BreakEvenSection({ query, target, control }: { query: UseQueryResult<LeversResponse>; target: number; control: ReactNode }) {
  const table = query.data?.breakEven ?? null;
  return (
    <Section
      id="levers-break-even"
      title="Break-even values"
      help={
        <p>
          The value each vital rate would need, everything else as it is, for λ to equal {formatNumber(target, 4)}. The search runs over the rate's whole allowed range
          (0 to 1 for a probability; up to 1000 times the value for an open range) on the exact λ. A rate used in several arrows can move λ up and then down, so every
          crossing is listed.
        </p>
      }
    >
      {control}
      {query.error && !table ? (
        <QueryError error={query.error} what="the break-even values" />
      ) : !table ? (
        <Loading label="Searching each rate's range…" />
      ) : (
        <div className={`overflow-x-auto ${query.isPlaceholderData ? "opacity-60" : ""}`}>
          <table className="w-full border-collapse text-left text-sm" data-testid="levers-break-even">
            <caption className="sr-only">Break-even values for λ = {target}</caption>
            <thead>
              <tr className="border-b-2 border-ink/20">
                {["Lever", "Now", "Range searched", `Value for λ = ${formatNumber(target, 4)}`, "Change needed"].map((h) => (
                  <th key={h} scope="col" className="px-2 py-2 whitespace-nowrap">
                    {h}
                  </th>
                ))}
              </tr>
            </thead>
            <tbody>
              {table.rows.map((r) => (
                <tr key={r.key} className="border-b border-ink/10 align-top">
                  <th scope="row" className="px-2 py-1 text-left font-bold">
                    {r.label}
                  </th>
                  <td className="px-2 py-1 tabular-nums">{formatNumber(r.value, 4)}</td>
                  <td className="px-2 py-1 tabular-nums whitespace-nowrap">
                    {formatNumber(r.lower, 4)} to {formatNumber(r.upper, 4)}
                    {!r.upperIsBound && <span className="block text-xs text-ink/75">(open above; searched this far)</span>}
                  </td>
                  <td className="px-2 py-1 tabular-nums">
                    {r.crossings.length === 0 ? (
                      <span>not reachable</span>
                    ) : (
                      r.crossings.map((c, k) => (
                        <span key={k} className="block">
                          {formatNumber(c.value, 5)}
                          <span className="text-xs text-ink/75"> {c.direction === "up" ? "(λ rises through it)" : c.direction === "down" ? "(λ falls through it)" : "(λ touches it)"}</span>
                        </span>
                      ))
                    )}
                    {r.note && <span className="block max-w-96 text-xs text-ink/80">{r.note}</span>}
                  </td>
                  <td className="px-2 py-1 tabular-nums">
                    {r.crossings.length === 0
                      ? "—"
                      : r.relativeChanges.map((x, k) => (
                          <span key={k} className="block">
                            {x === null ? "from 0" : `${x > 0 ? "+" : "−"}${formatPercent(Math.abs(x))}`}
                          </span>
                        ))}
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
        </div>
      )}
    </Section>
  );
}
