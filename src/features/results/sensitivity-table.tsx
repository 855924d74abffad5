import { createColumnHelper } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import type { LifeCycleAnalysis } from "../../../shared/schemas/life-cycles";
import { Badge } from "../../components/ui/badge";
import { DataTable } from "../../components/ui/data-table";
import { formatNumber } from "../../lib/number-format";

interface EntryRow {
  key: string;
  from: string;
  to: string;
  a: number;
  sensitivity: number;
  elasticity: number;
  structuralZero: boolean;
}

const column = createColumnHelper<EntryRow>();
const num = (digits: number) => (info: { getValue: () => number }) => <span className="tabular-nums">{formatNumber(info.getValue(), digits)}</span>;

const columns = [
  column.accessor("from", { header: "From (t)" }),
  column.accessor("to", { header: "To (t+1)" }),
  column.accessor("a", { header: "Entry aᵢⱼ", cell: num(4) }),
  column.accessor("sensitivity", { header: "Sensitivity", cell: num(4) }),
  column.accessor("elasticity", {
    header: "Elasticity",
    cell: (info) => (info.row.original.structuralZero ? <span className="text-ink/70">—</span> : <span className="tabular-nums">{formatNumber(info.getValue(), 4)}</span>),
  }),
  column.display({
    id: "note",
    header: "Note",
    cell: (info) => (info.row.original.structuralZero ? <Badge tone="warning">structural zero — not a lever</Badge> : null),
  }),
];

/** Above this many rows the table shows the largest ones only. */
const MAX_ROWS = 400;

/** Sensitivity and elasticity of λ to each matrix entry, largest elasticity first; structural zeros on request, flagged. */
export function SensitivityTable({ data }: { data: LifeCycleAnalysis }) {
  const [withZeros, setWithZeros] = useState(false);
  const rows = useMemo(() => {
    const out: EntryRow[] = [];
    const { sensitivity, elasticity, structuralZero, stageNames, matrices } = data;
    if (!sensitivity || !elasticity) return out;
    sensitivity.forEach((row, i) =>
      row.forEach((s, j) => {
        const zero = structuralZero[i]?.[j] ?? false;
        if (zero && !withZeros) return;
        out.push({ key: `${i}-${j}`, from: stageNames[j] ?? "", to: stageNames[i] ?? "", a: matrices.A[i]?.[j] ?? 0, sensitivity: s, elasticity: elasticity[i]?.[j] ?? 0, structuralZero: zero });
      }),
    );
    out.sort((x, y) => Number(x.structuralZero) - Number(y.structuralZero) || y.elasticity - x.elasticity || y.sensitivity - x.sensitivity);
    return out;
  }, [data, withZeros]);
  const shown = rows.slice(0, MAX_ROWS);
  return (
    <div className="space-y-2">
      <label className="inline-flex items-center gap-2 text-sm">
        <input type="checkbox" checked={withZeros} onChange={(e) => setWithZeros(e.target.checked)} className="size-4 accent-spruce" />
        Include structural zeros (entries with no arrow)
      </label>
      <DataTable data={shown} columns={columns} caption="Sensitivity and elasticity of λ to each matrix entry" getRowId={(r) => r.key} sortable />
      {rows.length > MAX_ROWS && <p className="text-xs text-ink/75">Showing the {MAX_ROWS} largest of {rows.length} entries; the results CSV has them all.</p>}
    </div>
  );
}
