/**
 * A plain, dense, sortable table on @tanstack/react-table. Sorting is by the
 * header buttons (keyboard reachable, state in aria-sort); the table has a
 * caption so screen-reader users know which table they are in.
 */
import {
  type ColumnDef,
  type SortingState,
  flexRender,
  getCoreRowModel,
  getSortedRowModel,
  useReactTable,
} from "@tanstack/react-table";
import { type ReactNode, useState } from "react";

type DataTableProps<Row> = {
  data: Row[];
  // eslint-disable-next-line @typescript-eslint/no-explicit-any -- column value types differ per column
  columns: ColumnDef<Row, any>[];
  caption: string;
  /** Hide the caption visually (a heading above already says the same). */
  hideCaption?: boolean;
  getRowId: (row: Row) => string;
  initialSorting?: SortingState;
  /** Header buttons that sort; off for short lists where they only add buttons to tab through. */
  sortable?: boolean;
  empty?: ReactNode;
};

const sortMarks = { asc: "▲", desc: "▼" } as const;

export function DataTable<Row>({
  data,
  columns,
  caption,
  hideCaption = true,
  getRowId,
  initialSorting = [],
  sortable = true,
  empty,
}: DataTableProps<Row>) {
  const [sorting, setSorting] = useState<SortingState>(initialSorting);
  const table = useReactTable({
    data,
    columns,
    state: { sorting },
    onSortingChange: setSorting,
    enableSorting: sortable,
    getRowId,
    getCoreRowModel: getCoreRowModel(),
    getSortedRowModel: getSortedRowModel(),
  });

  if (data.length === 0 && empty) return <div className="py-3 text-ink/75">{empty}</div>;

  return (
    <div className="overflow-x-auto">
      <table className="w-full border-collapse text-left text-sm">
        <caption className={hideCaption ? "sr-only" : "pb-2 text-left font-bold"}>{caption}</caption>
        <thead>
          {table.getHeaderGroups().map((group) => (
            <tr key={group.id} className="border-b-2 border-ink/20">
              {group.headers.map((header) => {
                const sorted = header.column.getIsSorted();
                const canSort = header.column.getCanSort();
                const label = flexRender(header.column.columnDef.header, header.getContext());
                return (
                  <th
                    key={header.id}
                    scope="col"
                    className="px-2 py-2 font-bold whitespace-nowrap"
                    aria-sort={sorted === "asc" ? "ascending" : sorted === "desc" ? "descending" : undefined}
                  >
                    {header.isPlaceholder ? null : canSort ? (
                      <button
                        type="button"
                        onClick={header.column.getToggleSortingHandler()}
                        className="inline-flex items-center gap-1 rounded hover:text-indigo"
                      >
                        {label}
                        <span aria-hidden="true" className="w-3 text-xs text-ink/60">
                          {sorted ? sortMarks[sorted] : "↕"}
                        </span>
                      </button>
                    ) : (
                      label
                    )}
                  </th>
                );
              })}
            </tr>
          ))}
        </thead>
        <tbody>
          {table.getRowModel().rows.map((row) => (
            <tr key={row.id} className="border-b border-ink/10 align-middle hover:bg-ink/[0.03]">
              {row.getVisibleCells().map((cell) => (
                <td key={cell.id} className="px-2 py-2">
                  {flexRender(cell.column.columnDef.cell, cell.getContext())}
                </td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
