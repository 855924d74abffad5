/**
 * Sampling correlations between rates (for example survival and fecundity
 * estimated from the same animals): a pair of rates and r, between −1 and 1.
 * The delta method and the Monte Carlo draws use them; correlations that
 * contradict one another are reported by name.
 */
import type { LifeCycle } from "../../../shared/lifecycle";
import type { UncertaintyIssue } from "../../../shared/uncertainty";
import { Button } from "../../components/ui/button";
import { CommitInput } from "../../components/ui/commit-input";
import { parseNumberInput } from "./rate-checks";

const rCheck = (text: string) => {
  const r = parseNumberInput(text);
  return r === null || r < -1 || r > 1 ? { error: "A correlation is a number from −1 to 1." } : {};
};

export function CorrelationsEditor({
  document: doc,
  readOnly,
  issues,
  onChange,
}: {
  document: LifeCycle;
  readOnly: boolean;
  issues: readonly UncertaintyIssue[];
  onChange: (next: LifeCycle, label: string) => void;
}) {
  const list = doc.correlations ?? [];
  const name = (id: string) => doc.rates.find((r) => r.id === id)?.name ?? id;
  const set = (next: NonNullable<LifeCycle["correlations"]>, label: string) => {
    const copy: LifeCycle = { ...doc, correlations: next };
    if (next.length === 0) delete copy.correlations;
    onChange(copy, label);
  };
  const free = () => {
    const taken = new Set(list.map((c) => [c.a, c.b].sort().join("|")));
    for (const a of doc.rates) for (const b of doc.rates) if (a.id < b.id && !taken.has([a.id, b.id].sort().join("|"))) return [a.id, b.id] as const;
    return null;
  };
  const next = free();
  const ownIssues = issues.filter((i) => i.path[0] === "correlations");
  if (readOnly && list.length === 0) return null;

  return (
    <section aria-labelledby="correlations-heading" className="space-y-2">
      <h3 id="correlations-heading" className="text-lg font-bold">
        Correlations between rates
      </h3>
      <p className="max-w-3xl text-sm text-ink/80">
        When two estimates share their data (survival and fecundity from the same marked animals, say), their errors may be correlated. Give r for such pairs; rates not listed
        are independent. The intervals on the Results and Uncertainty tabs use them.
      </p>
      {list.length > 0 && (
        <table className="border-collapse text-left text-sm">
          <caption className="sr-only">Correlations between rates</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-1">Rate</th>
              <th scope="col" className="px-2 py-1">and rate</th>
              <th scope="col" className="px-2 py-1">r</th>
              {!readOnly && (
                <th scope="col" className="px-2 py-1">
                  <span className="sr-only">Actions</span>
                </th>
              )}
            </tr>
          </thead>
          <tbody>
            {list.map((c, i) => {
              const pick = (end: "a" | "b") =>
                readOnly ? (
                  <code>{name(c[end])}</code>
                ) : (
                  <select
                    aria-label={`${end === "a" ? "First" : "Second"} rate of correlation ${i + 1}`}
                    value={c[end]}
                    onChange={(e) => set(list.map((x, k) => (k === i ? { ...x, [end]: e.target.value } : x)), `Correlate ${name(end === "a" ? e.target.value : c.a)} and ${name(end === "b" ? e.target.value : c.b)}`)}
                    className="rounded border border-ink/35 bg-white px-1 py-1 font-mono"
                  >
                    {doc.rates.map((r) => (
                      <option key={r.id} value={r.id}>
                        {r.name}
                      </option>
                    ))}
                  </select>
                );
              return (
                <tr key={i} className="border-b border-ink/10">
                  <td className="px-2 py-1">{pick("a")}</td>
                  <td className="px-2 py-1">{pick("b")}</td>
                  <td className="w-28 px-2 py-1">
                    {readOnly ? (
                      <span className="tabular-nums">{c.r}</span>
                    ) : (
                      <CommitInput
                        label={`Correlation of ${name(c.a)} and ${name(c.b)}`}
                        value={String(c.r)}
                        inputMode="decimal"
                        check={rCheck}
                        onCommit={(text) => set(list.map((x, k) => (k === i ? { ...x, r: parseNumberInput(text)! } : x)), `Set the correlation of ${name(c.a)} and ${name(c.b)}`)}
                      />
                    )}
                  </td>
                  {!readOnly && (
                    <td className="px-2 py-1">
                      <Button variant="quiet" size="sm" onClick={() => set(list.filter((_, k) => k !== i), `Remove the correlation of ${name(c.a)} and ${name(c.b)}`)}>
                        Remove
                      </Button>
                    </td>
                  )}
                </tr>
              );
            })}
          </tbody>
        </table>
      )}
      {ownIssues.map((issue, k) => (
        <p key={k} className="text-sm" data-uncertainty-issue={issue.severity}>
          <span aria-hidden="true" className={`font-bold ${issue.severity === "error" ? "text-brick" : "text-ochre"}`}>
            {issue.severity === "error" ? "✕ " : "! "}
          </span>
          {issue.message}
        </p>
      ))}
      {!readOnly && next && (
        <Button variant="secondary" size="sm" onClick={() => set([...list, { a: next[0], b: next[1], r: 0 }], "Add a correlation")}>
          Add a correlation
        </Button>
      )}
    </section>
  );
}
