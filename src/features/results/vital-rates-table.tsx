import { createColumnHelper } from "@tanstack/react-table";
import type { VitalRateSensitivity } from "../../../shared/lifecycle";
import { DataTable } from "../../components/ui/data-table";
import { formatNumber } from "../../lib/number-format";

const column = createColumnHelper<VitalRateSensitivity>();

const columns = [
  column.accessor("name", { header: "Vital rate", cell: (info) => <code className="font-bold">{info.getValue()}</code> }),
  column.accessor("value", { header: "Value", cell: (info) => <span className="tabular-nums">{formatNumber(info.getValue(), 4)}</span> }),
  column.accessor("sensitivity", {
    header: "Sensitivity ∂λ/∂x",
    cell: (info) => (info.row.original.error ? <span className="text-brick">{info.row.original.error.message}</span> : <span className="tabular-nums">{formatNumber(info.getValue(), 4)}</span>),
  }),
  column.accessor((r) => Math.abs(r.elasticity), {
    id: "elasticity",
    header: "Elasticity (x/λ) ∂λ/∂x",
    cell: (info) => <span className="tabular-nums">{formatNumber(info.row.original.elasticity, 4)}</span>,
  }),
];

/** λ's response to each named vital rate, through every formula that uses it; largest elasticity (in size) first. */
export function VitalRatesTable({ rates }: { rates: readonly VitalRateSensitivity[] }) {
  return (
    <DataTable
      data={[...rates]}
      columns={columns}
      caption="Sensitivity and elasticity of λ to each vital rate"
      getRowId={(r) => r.rateId}
      initialSorting={[{ id: "elasticity", desc: true }]}
      empty={<p>No arrow uses a named vital rate, so there is nothing to show here. Name rates in Rates and use them in arrow formulas.</p>}
    />
  );
}
