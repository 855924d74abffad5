/** One matrix cell and the arrows behind it: change each arrow's number or kind, replace a formula by a number, add or remove arrows. */
import { useState } from "react";
import type { LifeCycle, TransitionKind } from "../../../shared/lifecycle";
import { Button } from "../../components/ui/button";
import { CommitInput } from "../../components/ui/commit-input";
import { formatNumber } from "../../lib/number-format";
import { addArrow, availableKinds, cellArrows, replaceFormulaWithNumber, setArrowKind, setArrowValue } from "./matrix-edit";
import { parseEntry } from "./parse-entry";

const KIND_WORDS: Record<TransitionKind, string> = {
  growth: "growth",
  stasis: "stasis",
  shrinkage: "shrinkage",
  reproduction: "reproduction",
};

interface CellInspectorProps {
  document: LifeCycle;
  to: string;
  from: string;
  readOnly: boolean;
  valueOf: (transitionId: string) => number;
  onEdit: (next: LifeCycle, label: string, message?: string) => void;
  onClose: () => void;
}

export function CellInspector({ document: doc, to, from, readOnly, valueOf, onEdit, onClose }: CellInspectorProps) {
  const arrows = cellArrows(doc, to, from);
  const kinds = availableKinds(doc, to, from);
  const [newKind, setNewKind] = useState<TransitionKind | "">("");
  const [newValue, setNewValue] = useState("");
  const toName = doc.stages.find((s) => s.id === to)?.name ?? to;
  const fromName = doc.stages.find((s) => s.id === from)?.name ?? from;
  const kindToAdd = newKind !== "" && kinds.includes(newKind) ? newKind : (kinds[0] ?? null);
  const parsedNew = parseEntry(newValue);

  return (
    <section aria-labelledby="cell-inspector-heading" className="max-w-3xl rounded-lg border border-ink/20 bg-white p-4">
      <div className="mb-3 flex items-start justify-between gap-3">
        <h3 id="cell-inspector-heading" className="font-bold">
          Cell from {fromName} (column) to {toName} (row)
        </h3>
        <Button variant="quiet" size="sm" onClick={onClose}>
          Close
        </Button>
      </div>

      {arrows.length === 0 ? (
        <p className="text-ink/80">No arrow goes from {fromName} to {toName}: the entry is 0.</p>
      ) : (
        <ul className="space-y-3">
          {arrows.map((t) => {
            const v = valueOf(t.id);
            const kindOptions = [t.kind, ...kinds.filter((k) => k !== t.kind && (k === "reproduction") !== (t.kind === "reproduction"))];
            return (
              <li key={t.id} className={`rounded-md border p-3 ${t.kind === "reproduction" ? "border-2 border-dashed border-clay" : "border-spruce/50"}`}>
                <div className="flex flex-wrap items-center gap-3">
                  {readOnly || kindOptions.length === 1 ? (
                    <span className="font-bold">{KIND_WORDS[t.kind]} arrow</span>
                  ) : (
                    <label className="inline-flex items-center gap-2">
                      <span className="font-bold">Kind</span>
                      <select
                        value={t.kind}
                        onChange={(e) => {
                          const r = setArrowKind(doc, t.id, e.target.value as TransitionKind);
                          onEdit(r.document, r.label);
                        }}
                        className="rounded border border-ink/35 bg-white px-2 py-1"
                      >
                        {kindOptions.map((k) => (
                          <option key={k} value={k}>
                            {KIND_WORDS[k]}
                          </option>
                        ))}
                      </select>
                    </label>
                  )}
                  {typeof t.rate === "string" ? (
                    <span>
                      formula <code className="rounded bg-ink/5 px-1 font-bold">{t.rate}</code> = <span className="tabular-nums">{Number.isNaN(v) ? "cannot be computed" : formatNumber(v, 6)}</span>
                    </span>
                  ) : readOnly ? (
                    <span className="tabular-nums">{formatNumber(t.rate, 6)}</span>
                  ) : (
                    <CommitInput
                      label={`Rate of the ${t.kind} arrow from ${fromName} to ${toName}`}
                      value={String(t.rate)}
                      inputMode="decimal"
                      className="w-32"
                      inputClassName="text-right"
                      check={(text) => (parseEntry(text) === null ? { error: "A number ≥ 0 (0 removes the arrow)." } : {})}
                      onCommit={(text) => {
                        const r = setArrowValue(doc, t.id, parseEntry(text)!);
                        onEdit(r.document, r.label);
                      }}
                    />
                  )}
                  {!readOnly && (
                    <span className="ml-auto flex flex-wrap gap-2">
                      {typeof t.rate === "string" && !Number.isNaN(v) && (
                        <Button
                          size="sm"
                          variant="secondary"
                          onClick={() => {
                            // 12 significant digits: 0.3 * 4.5 becomes 1.35, not 1.3499999999999999.
                            const value = Number(v.toPrecision(12));
                            const r = replaceFormulaWithNumber(doc, t.id, value);
                            onEdit(r.document, r.label, `Replaced the formula ${String(t.rate)} with its value ${value}; the arrow no longer follows its vital rates.`);
                          }}
                        >
                          Replace formula with a number
                        </Button>
                      )}
                      <Button
                        size="sm"
                        variant="quiet"
                        onClick={() => {
                          const r = setArrowValue(doc, t.id, 0);
                          onEdit(r.document, r.label);
                        }}
                      >
                        Remove arrow
                      </Button>
                    </span>
                  )}
                </div>
                {typeof t.rate === "string" && !readOnly && (
                  <p className="mt-2 text-xs text-ink/75">A formula follows its vital rates: change them in Rates. Replacing it with a number keeps today’s value and drops the link.</p>
                )}
              </li>
            );
          })}
        </ul>
      )}

      {!readOnly && kindToAdd !== null && (
        <form
          className="mt-4 flex flex-wrap items-end gap-3 border-t border-ink/10 pt-3"
          onSubmit={(e) => {
            e.preventDefault();
            if (parsedNew === null || parsedNew === 0) return;
            const r = addArrow(doc, to, from, kindToAdd, parsedNew);
            onEdit(r.document, r.label);
            setNewValue("");
          }}
        >
          <label className="space-y-1">
            <span className="block text-xs font-bold">Add an arrow of kind</span>
            <select value={kindToAdd} onChange={(e) => setNewKind(e.target.value as TransitionKind)} className="rounded border border-ink/35 bg-white px-2 py-1">
              {kinds.map((k) => (
                <option key={k} value={k}>
                  {KIND_WORDS[k]}
                </option>
              ))}
            </select>
          </label>
          <label className="space-y-1">
            <span className="block text-xs font-bold">with the rate</span>
            <input
              value={newValue}
              onChange={(e) => setNewValue(e.target.value)}
              inputMode="decimal"
              placeholder="e.g. 0.3"
              aria-invalid={(newValue !== "" && parsedNew === null) || undefined}
              className="w-28 rounded border border-ink/35 bg-white px-2 py-1 text-right tabular-nums"
            />
          </label>
          <Button type="submit" size="sm" disabled={parsedNew === null || parsedNew === 0}>
            Add arrow
          </Button>
          {newValue !== "" && parsedNew === null && <p className="w-full text-xs font-bold text-brick">A number greater than 0.</p>}
        </form>
      )}
    </section>
  );
}
