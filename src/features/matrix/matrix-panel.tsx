/**
 * Matrix: the projection matrix built from the diagram's arrows, editable in
 * both directions. Row = stage at t+1 (the arrow's "to"), column = stage at t
 * (its "from"). Typing a number into an empty cell creates an arrow, typing 0
 * removes it. Cells computed from formulas show the formula and are never
 * overwritten by typing: replacing a formula with a number is its own action.
 */
import { type KeyboardEvent, useMemo, useState } from "react";
import { buildMatrices, type LifeCycle, type Transition } from "../../../shared/lifecycle";
import { CommitInput } from "../../components/ui/commit-input";
import { CopyButton } from "../../components/ui/copy-button";
import { matrixCsv } from "../../lib/csv-export";
import type { EditorPanelProps } from "../../lib/editor-types";
import { formatNumber } from "../../lib/number-format";
import { shade } from "./elasticity-shade";
import { CellInspector } from "./cell-inspector";
import { defaultKind, setCellValue } from "./matrix-edit";
import { parseEntry } from "./parse-entry";

/** Above this many stages the grid shows numbers only; cells are edited one at a time below the matrix. */
const INLINE_EDIT_MAX_STAGES = 40;

type NewArrowKind = "survival" | "reproduction";

interface Cell {
  to: string;
  from: string;
}

const cellKey = (to: string, from: string) => `${to}\u0000${from}`;

export function MatrixPanel({ document: doc, onChange, readOnly, analysis, selection, onSelect, commentCounts }: EditorPanelProps) {
  const m = useMemo(() => buildMatrices(doc), [doc]);
  const arrowsByCell = useMemo(() => {
    const map = new Map<string, Transition[]>();
    for (const t of doc.transitions) {
      const k = cellKey(t.to, t.from);
      map.set(k, [...(map.get(k) ?? []), t]);
    }
    return map;
  }, [doc.transitions]);
  const valueById = useMemo(() => new Map(m.entries.map((e) => [e.transitionId, e])), [m.entries]);
  const [shaded, setShaded] = useState(false);
  const [newKind, setNewKind] = useState<NewArrowKind>("survival");
  const [active, setActiveCell] = useState<Cell | null>(null);
  // The active cell is also the editor's selection (a review comment can be anchored to it).
  const setActive = (cell: Cell | null) => {
    setActiveCell(cell);
    if (cell) onSelect({ kind: "cell", to: cell.to, from: cell.from });
  };
  const [status, setStatus] = useState("");

  const n = doc.stages.length;
  const inline = !readOnly && n <= INLINE_EDIT_MAX_STAGES;
  const selectedCell = selection?.kind === "cell" ? selection : null;
  const activeCell = active ?? (selectedCell ? { to: selectedCell.to, from: selectedCell.from } : null);

  // Elasticities from the analysis, matched to the current stages by id (the result may be older).
  const elasticity = useMemo(() => {
    const data = analysis.data;
    if (!data?.elasticity) return null;
    const index = new Map(data.stageIds.map((id, i) => [id, i]));
    let max = 0;
    for (const row of data.elasticity) for (const e of row) max = Math.max(max, e);
    return {
      max,
      at: (to: string, from: string) => {
        const i = index.get(to);
        const j = index.get(from);
        return i === undefined || j === undefined ? null : (data.elasticity?.[i]?.[j] ?? null);
      },
    };
  }, [analysis.data]);

  // Column sums of U: the probability of surviving out of each stage, which cannot exceed 1.
  const survivalOut = useMemo(() => m.stageIds.map((_, j) => m.U.reduce((s, row) => s + (row[j] ?? 0), 0)), [m]);

  const csv = useMemo(() => (m.errors.length === 0 && n > 0 ? matrixCsv(m.A, m.stageNames) : ""), [m, n]);

  function apply(next: LifeCycle, label: string, message?: string) {
    if (label === "") return;
    onChange(next, label);
    setStatus(message ?? `${label}.`);
  }

  if (n === 0) {
    return (
      <section aria-labelledby="matrix-heading" className="space-y-3">
        <h2 id="matrix-heading" className="text-xl font-bold">
          Matrix
        </h2>
        <p className="rounded-md border border-dashed border-ink/30 p-4 text-ink/80">The life cycle has no stages yet. Add stages in the Diagram; the matrix has one row and one column per stage.</p>
      </section>
    );
  }

  return (
    <section aria-labelledby="matrix-heading" className="space-y-4">
      <div className="space-y-1">
        <h2 id="matrix-heading" className="text-xl font-bold">
          Matrix
        </h2>
        <p className="max-w-3xl text-sm text-ink/80">
          The projection matrix A built from the arrows. <strong>Rows are the stage at the next census (where an arrow goes); columns are the stage now (where it comes from).</strong> Entry a
          <sub>ij</sub> is the rate from column j to row i; A = U (survival, growth, stasis, shrinkage) + F (reproduction).
          {inline && " Type a number into a cell and press Enter to create or change its arrow; 0 removes it. Arrow keys move between cells."}
          {!readOnly && !inline && ` With more than ${INLINE_EDIT_MAX_STAGES} stages, choose a cell to change its arrows below the matrix.`}
          {readOnly && " Choose a cell to see the arrows behind it."}
        </p>
      </div>

      <div className="flex flex-wrap items-center gap-x-6 gap-y-2 text-sm">
        <label className="inline-flex items-center gap-2">
          <input type="checkbox" checked={shaded} disabled={!elasticity} onChange={(e) => setShaded(e.target.checked)} className="size-4 accent-spruce" />
          Shade cells by elasticity
          {!elasticity && <span className="text-ink/70">(after a successful analysis)</span>}
          {shaded && analysis.stale && <span className="text-ink/70">(from the last result)</span>}
        </label>
        {inline && (
          <fieldset className="inline-flex flex-wrap items-center gap-3">
            <legend className="sr-only">Kind of arrow a number typed into an empty cell creates</legend>
            <span aria-hidden="true" className="font-bold">
              Empty cells become:
            </span>
            <label className="inline-flex items-center gap-1.5">
              <input type="radio" name="matrix-new-kind" checked={newKind === "survival"} onChange={() => setNewKind("survival")} className="accent-spruce" />
              survival arrows <span className="text-ink/70">(stasis on the diagonal, growth below, shrinkage above)</span>
            </label>
            <label className="inline-flex items-center gap-1.5">
              <input type="radio" name="matrix-new-kind" checked={newKind === "reproduction"} onChange={() => setNewKind("reproduction")} className="accent-clay" />
              reproduction arrows
            </label>
          </fieldset>
        )}
        {csv !== "" && <CopyButton value={csv} label="Copy as CSV" />}
      </div>

      {m.errors.length > 0 && (
        <p className="text-sm">
          <span aria-hidden="true" className="font-bold text-brick">✕ </span>
          {m.errors.length === 1 ? "One arrow's rate cannot be computed" : `${m.errors.length} arrows' rates cannot be computed`}; its cell shows “?”. {m.errors[0]!.message}
        </p>
      )}

      <div className="overflow-x-auto">
        <table className="border-collapse text-sm">
          <caption className="sr-only">Projection matrix A: rows are the stage at t+1 (to), columns the stage at t (from)</caption>
          <thead>
            <tr>
              <td className="px-2 pb-1 text-xs whitespace-nowrap text-ink/75">
                <span className="block text-right">from (t) →</span>
                <span className="block">to (t+1) ↓</span>
              </td>
              {m.stageNames.map((name, j) => (
                <th key={m.stageIds[j]} scope="col" className="max-w-32 px-2 pb-1 text-center align-bottom font-bold break-words">
                  {name}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {m.stageIds.map((to, i) => (
              <tr key={to}>
                <th scope="row" className="max-w-48 min-w-28 py-1 pr-3 text-right font-bold break-words">
                  {m.stageNames[i]}
                </th>
                {m.stageIds.map((from, j) => {
                  const arrows = arrowsByCell.get(cellKey(to, from)) ?? [];
                  const e = shaded ? (elasticity?.at(to, from) ?? null) : null;
                  const look = e !== null && elasticity && elasticity.max > 0 ? shade(e / elasticity.max) : null;
                  const isActive = activeCell?.to === to && activeCell.from === from;
                  const reproduction = arrows.some((t) => t.kind === "reproduction");
                  const value = m.A[i]![j]!;
                  const cellName = `${m.stageNames[j]} to ${m.stageNames[i]}`;
                  const single = arrows.length <= 1 && (arrows[0] === undefined || typeof arrows[0].rate === "number");
                  return (
                    <td
                      key={from}
                      data-cell={`${to}:${from}`}
                      style={look ? { backgroundColor: look.background } : undefined}
                      className={`min-w-24 border p-1 align-top ${look?.lightText ? "text-white" : ""} ${
                        reproduction ? "border-2 border-dashed border-clay" : "border-ink/15"
                      } ${isActive ? "outline-2 outline-indigo" : ""} ${i === j && !look ? "bg-ink/[0.03]" : ""}`}
                    >
                      {inline && single ? (
                        <CommitInput
                          label={`Entry from ${cellName}`}
                          value={arrows[0] ? String(arrows[0].rate) : ""}
                          placeholder="0"
                          inputMode="decimal"
                          inputClassName={`text-right ${look ? "bg-white/85 text-ink" : ""}`}
                          onFocus={() => setActive({ to, from })}
                          data-row={i}
                          data-col={j}
                          onKeyDown={moveBetweenCells}
                          check={(text) => {
                            const v = parseEntry(text);
                            if (v === null) return { error: "A number ≥ 0." };
                            const r = setCellValue(doc, to, from, v, newKind === "reproduction" && arrows.length === 0 ? "reproduction" : undefined);
                            return "error" in r ? { error: r.error } : {};
                          }}
                          onCommit={(text) => {
                            const v = parseEntry(text)!;
                            const kind = arrows.length === 0 ? (newKind === "reproduction" ? "reproduction" : defaultKind(doc, to, from)) : undefined;
                            const r = setCellValue(doc, to, from, v, kind);
                            if (!("error" in r)) apply(r.document, r.label);
                          }}
                        />
                      ) : (
                        <button
                          type="button"
                          data-row={i}
                          data-col={j}
                          onKeyDown={moveBetweenCells}
                          onClick={() => setActive({ to, from })}
                          aria-label={`Entry from ${cellName}: ${describeCell(arrows, value)}${readOnly ? "" : ". Show or change its arrows"}`}
                          className="block w-full rounded px-1 py-0.5 text-right"
                        >
                          <CellContent arrows={arrows} value={value} valueOf={(id) => valueById.get(id)?.value ?? NaN} light={look?.lightText ?? false} />
                        </button>
                      )}
                      {(commentCounts.get(`cell:${to}:${from}`) ?? 0) > 0 && (
                        <span
                          className="float-left rounded-full bg-indigo px-1.5 text-[10px] leading-4 font-bold text-white"
                          title="Open review threads on this entry (Review tab)"
                          data-comment-marker=""
                        >
                          <span aria-hidden="true">✎ </span>
                          {commentCounts.get(`cell:${to}:${from}`)}
                          <span className="sr-only"> open review threads on this entry</span>
                        </span>
                      )}
                      {reproduction && <span className="block text-right text-[10px] font-bold tracking-wide uppercase">reproduction</span>}
                      {e !== null && arrows.length > 0 && <span className="block text-right text-[10px] tabular-nums">elasticity {formatNumber(e, 2)}</span>}
                    </td>
                  );
                })}
              </tr>
            ))}
          </tbody>
          <tfoot>
            <tr>
              <th scope="row" className="py-2 pr-3 text-right text-xs font-bold">
                Survival out of the stage
                <span className="block font-normal text-ink/75">column sum of U, at most 1</span>
              </th>
              {survivalOut.map((s, j) => (
                <td key={m.stageIds[j]} className="px-2 py-2 text-right text-xs tabular-nums">
                  {Number.isNaN(s) ? "?" : formatNumber(s, 4)}
                  {s > 1 + 1e-12 && (
                    <span className="block font-bold">
                      <span aria-hidden="true" className="text-ochre">! </span>above 1
                    </span>
                  )}
                </td>
              ))}
            </tr>
          </tfoot>
        </table>
      </div>

      <p role="status" className="min-h-5 text-sm text-ink/80">
        {status}
      </p>

      {activeCell && doc.stages.some((s) => s.id === activeCell.to) && doc.stages.some((s) => s.id === activeCell.from) && (
        <CellInspector
          document={doc}
          to={activeCell.to}
          from={activeCell.from}
          readOnly={readOnly}
          valueOf={(id) => valueById.get(id)?.value ?? NaN}
          onEdit={apply}
          onClose={() => setActive(null)}
        />
      )}
    </section>
  );
}

/**
 * Arrow keys move between cells like a spreadsheet: up and down always, left
 * and right when the caret is at the edge of the text (or on a button).
 */
function moveBetweenCells(event: KeyboardEvent<HTMLElement>) {
  const el = event.currentTarget;
  const row = Number(el.dataset.row);
  const col = Number(el.dataset.col);
  const input = el instanceof HTMLInputElement ? el : null;
  const atStart = !input || (input.selectionStart === 0 && input.selectionEnd === 0);
  const atEnd = !input || (input.selectionStart === input.value.length && input.selectionEnd === input.value.length);
  const step: Record<string, [number, number] | null> = {
    ArrowUp: [-1, 0],
    ArrowDown: [1, 0],
    ArrowLeft: atStart ? [0, -1] : null,
    ArrowRight: atEnd ? [0, 1] : null,
  };
  const d = step[event.key];
  if (!d || event.defaultPrevented || event.altKey || event.ctrlKey || event.metaKey || event.shiftKey) return;
  const target = el.closest("table")?.querySelector<HTMLElement>(`[data-row="${row + d[0]}"][data-col="${col + d[1]}"]`);
  if (!target) return;
  event.preventDefault();
  target.focus();
}

function describeCell(arrows: Transition[], value: number): string {
  if (arrows.length === 0) return "0, no arrow";
  if (Number.isNaN(value)) return "cannot be computed";
  const parts = arrows.map((t) => (typeof t.rate === "string" ? `${t.kind} ${t.rate}` : `${t.kind} ${t.rate}`));
  return `${formatNumber(value, 6)} (${parts.join(" plus ")})`;
}

function CellContent({ arrows, value, valueOf, light }: { arrows: Transition[]; value: number; valueOf: (id: string) => number; light: boolean }) {
  if (arrows.length === 0) return <span className={`tabular-nums ${light ? "" : "text-ink/60"}`}>0</span>;
  if (arrows.length === 1 && typeof arrows[0]!.rate === "string") {
    const v = valueOf(arrows[0]!.id);
    return (
      <span className="block">
        <span className="block truncate font-mono text-xs" title={arrows[0]!.rate}>
          <span aria-hidden="true" className={`mr-1 font-sans font-bold ${light ? "" : "text-indigo"}`}>
            ƒ
          </span>
          {arrows[0]!.rate}
        </span>
        <span className="block tabular-nums">{Number.isNaN(v) ? "?" : formatNumber(v, 4)}</span>
      </span>
    );
  }
  return (
    <span className="block">
      <span className="block tabular-nums">{Number.isNaN(value) ? "?" : formatNumber(value, 4)}</span>
      {arrows.length > 1 && <span className="block text-[10px]">{arrows.length} arrows</span>}
    </span>
  );
}
