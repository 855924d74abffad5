/** A diff of two states of a life cycle, for reading: settings, stages, rates (old → new), arrows and matrix cells. */
import type { ReactNode } from "react";
import type { VitalRate } from "../../../shared/lifecycle";
import { formatNumber, formatWithUncertainty } from "../../lib/number-format";
import type { ArrowSummary, LifeCycleDiff, RateField } from "./snapshot-diff";

const FIELD_WORDS: Record<RateField, string> = { name: "name", value: "value", se: "SE", ci: "CI", unit: "unit", source: "source", notes: "notes" };
const SETTING_WORDS = { name: "Name", census: "Census", timeStepUnit: "Time step", notes: "Notes" } as const;

function rateField(rate: VitalRate, field: RateField): string {
  switch (field) {
    case "value":
      return String(rate.value);
    case "se":
      return rate.se === undefined ? "none" : String(rate.se);
    case "ci":
      return rate.ci === undefined ? "none" : `${rate.ci.lower}–${rate.ci.upper} (${formatNumber(rate.ci.level * 100, 3)} %)`;
    default:
      return rate[field] ?? "none";
  }
}

const arrow = (a: ArrowSummary) => (
  <>
    <strong>
      {a.fromName} → {a.toName}
    </strong>{" "}
    ({a.kind}): <code>{String(a.rate)}</code>
  </>
);

function Block({ title, count, children }: { title: string; count: number; children: ReactNode }) {
  if (count === 0) return null;
  return (
    <section className="space-y-1.5">
      <h4 className="font-bold">
        {title} <span className="font-normal text-ink/75">({count})</span>
      </h4>
      {children}
    </section>
  );
}

const Old = ({ children }: { children: ReactNode }) => (
  <span className="rounded bg-brick/10 px-1 line-through decoration-brick/60">
    <span className="sr-only">was </span>
    {children}
  </span>
);
const New = ({ children }: { children: ReactNode }) => (
  <span className="rounded bg-spruce/15 px-1 font-bold">
    <span className="sr-only">now </span>
    {children}
  </span>
);

export function DiffView({ diff, beforeLabel, afterLabel }: { diff: LifeCycleDiff; beforeLabel: string; afterLabel: string }) {
  if (diff.empty) {
    return (
      <p className="rounded-md border border-ink/15 bg-white p-3" role="status">
        No differences in the model between {beforeLabel} and {afterLabel} (diagram positions and colours are not compared).
      </p>
    );
  }
  const { stages, rates, arrows, cells, settings } = diff;
  return (
    <div className="space-y-4 rounded-md border border-ink/15 bg-white p-4" aria-label={`Changes from ${beforeLabel} to ${afterLabel}`} role="region">
      <p className="text-sm text-ink/80">
        From <strong>{beforeLabel}</strong> to <strong>{afterLabel}</strong>. <Old>Struck out</Old> is the old value, <New>bold</New> the new.
      </p>

      <Block title="Settings" count={settings.length}>
        <ul className="space-y-1 text-sm">
          {settings.map((s) => (
            <li key={s.field}>
              {SETTING_WORDS[s.field]}: <Old>{s.before || "none"}</Old> → <New>{s.after || "none"}</New>
            </li>
          ))}
        </ul>
      </Block>

      <Block title="Stages" count={stages.added.length + stages.removed.length + stages.renamed.length + (stages.reordered ? 1 : 0)}>
        <ul className="space-y-1 text-sm">
          {stages.added.map((s) => (
            <li key={s.id}>
              Added <New>{s.name}</New>
            </li>
          ))}
          {stages.removed.map((s) => (
            <li key={s.id}>
              Removed <Old>{s.name}</Old>
            </li>
          ))}
          {stages.renamed.map((s) => (
            <li key={s.id}>
              Renamed <Old>{s.before}</Old> → <New>{s.after}</New>
            </li>
          ))}
          {stages.reordered && <li>The order of the stages (rows and columns of the matrix) changed.</li>}
        </ul>
      </Block>

      <Block title="Vital rates" count={rates.added.length + rates.removed.length + rates.changed.length}>
        {rates.changed.length > 0 && (
          <table className="w-full border-collapse text-left text-sm">
            <caption className="sr-only">Changed vital rates</caption>
            <thead>
              <tr className="border-b border-ink/20">
                <th scope="col" className="px-2 py-1">Rate</th>
                <th scope="col" className="px-2 py-1">What</th>
                <th scope="col" className="px-2 py-1">Old → new</th>
              </tr>
            </thead>
            <tbody>
              {rates.changed.flatMap((c) =>
                c.fields.map((f) => (
                  <tr key={`${c.id}-${f}`} className="border-b border-ink/10">
                    <th scope="row" className="px-2 py-1 font-mono font-bold">
                      {c.name}
                    </th>
                    <td className="px-2 py-1">{FIELD_WORDS[f]}</td>
                    <td className="px-2 py-1 tabular-nums">
                      <Old>{rateField(c.before, f)}</Old> → <New>{rateField(c.after, f)}</New>
                    </td>
                  </tr>
                )),
              )}
            </tbody>
          </table>
        )}
        <ul className="space-y-1 text-sm">
          {rates.added.map((r) => (
            <li key={r.id}>
              Added <New>{r.name}</New> = {formatWithUncertainty(r.value, r)}
            </li>
          ))}
          {rates.removed.map((r) => (
            <li key={r.id}>
              Removed <Old>{r.name}</Old> (was {formatWithUncertainty(r.value, r)})
            </li>
          ))}
        </ul>
      </Block>

      <Block title="Arrows" count={arrows.added.length + arrows.removed.length + arrows.changed.length}>
        <ul className="space-y-1 text-sm">
          {arrows.added.map((a) => (
            <li key={`add-${a.id}`}>Added {arrow(a)}</li>
          ))}
          {arrows.removed.map((a) => (
            <li key={`rm-${a.id}`}>Removed {arrow(a)}</li>
          ))}
          {arrows.changed.map((a) => (
            <li key={a.id}>
              <strong>
                {a.fromName} → {a.toName}
              </strong>
              :{" "}
              {a.before.kind !== a.after.kind && (
                <>
                  kind <Old>{a.before.kind}</Old> → <New>{a.after.kind}</New>
                  {a.before.rate !== a.after.rate && "; "}
                </>
              )}
              {a.before.rate !== a.after.rate && (
                <>
                  rate <Old>{String(a.before.rate)}</Old> → <New>{String(a.after.rate)}</New>
                </>
              )}
            </li>
          ))}
        </ul>
      </Block>

      <Block title="Matrix cells" count={cells.length}>
        <table className="w-full border-collapse text-left text-sm">
          <caption className="sr-only">Changed matrix entries</caption>
          <thead>
            <tr className="border-b border-ink/20">
              <th scope="col" className="px-2 py-1">From (t)</th>
              <th scope="col" className="px-2 py-1">To (t+1)</th>
              <th scope="col" className="px-2 py-1 text-right">Old</th>
              <th scope="col" className="px-2 py-1 text-right">New</th>
              <th scope="col" className="px-2 py-1 text-right">Change</th>
            </tr>
          </thead>
          <tbody>
            {cells.map((c) => (
              <tr key={`${c.to}-${c.from}`} className="border-b border-ink/10 tabular-nums">
                <td className="px-2 py-1">{c.fromName}</td>
                <td className="px-2 py-1">{c.toName}</td>
                <td className="px-2 py-1 text-right">{c.before === null ? "—" : formatNumber(c.before, 4)}</td>
                <td className="px-2 py-1 text-right font-bold">{c.after === null ? "—" : formatNumber(c.after, 4)}</td>
                <td className="px-2 py-1 text-right">{c.before === null || c.after === null ? "" : `${c.after >= c.before ? "+" : "−"}${formatNumber(Math.abs(c.after - c.before), 3)}`}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </Block>
    </div>
  );
}
