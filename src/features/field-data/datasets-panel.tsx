import { createColumnHelper } from "@tanstack/react-table";
import { useMemo, useState } from "react";
import { type DatasetSummary, useDatasets, useDeleteDataset, useRenameDataset } from "../../api/field-data";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { DataTable } from "../../components/ui/data-table";
import { ConfirmDialog, Dialog } from "../../components/ui/dialog";
import { TextField } from "../../components/ui/field";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { TextLink } from "../../components/ui/text-link";
import { RelativeTime } from "../../components/ui/time";
import { paths } from "../../routes/paths";

const column = createColumnHelper<DatasetSummary>();
export const KIND_LABEL = { counts: "Census counts", "stage-fates": "Stage fates" } as const;

const years = (d: DatasetSummary) => (d.firstYear === null ? "—" : `${Math.floor(d.firstYear)}–${Math.floor(d.lastYear ?? d.firstYear)}`);

/** The Study's datasets; editors rename and delete them. */
export function DatasetsTable({ studyId, canEdit, compact = false }: { studyId: string; canEdit: boolean; compact?: boolean }) {
  const list = useDatasets(studyId);
  const rename = useRenameDataset(studyId);
  const remove = useDeleteDataset(studyId);
  const [renaming, setRenaming] = useState<DatasetSummary | null>(null);
  const [newName, setNewName] = useState("");
  const [toDelete, setToDelete] = useState<DatasetSummary | null>(null);

  const columns = useMemo(
    () => [
      column.accessor("name", { header: "Dataset", cell: (i) => <TextLink to={paths.dataset(i.row.original.id)}>{i.getValue()}</TextLink> }),
      column.accessor("kind", { header: "Kind", cell: (i) => KIND_LABEL[i.getValue()] }),
      column.accessor("rowCount", { header: "Rows", cell: (i) => <span className="tabular-nums">{i.getValue().toLocaleString("en")}</span> }),
      column.display({ id: "years", header: "Years", cell: (i) => <span className="tabular-nums">{years(i.row.original)}</span> }),
      ...(compact ? [] : [column.accessor("sites", { header: "Sites", cell: (i) => (i.getValue().length ? i.getValue().join(", ") : "—") })]),
      column.accessor("uploadedAt", {
        header: "Uploaded",
        cell: (i) => (
          <>
            <RelativeTime iso={i.getValue()} />
            {i.row.original.uploadedBy && <span className="text-ink/75"> by {i.row.original.uploadedBy}</span>}
          </>
        ),
      }),
      ...(canEdit && !compact
        ? [
            column.display({
              id: "actions",
              header: () => <span className="sr-only">Actions</span>,
              cell: (i) => (
                <div className="flex justify-end gap-1">
                  <Button size="sm" variant="secondary" onClick={() => { setRenaming(i.row.original); setNewName(i.row.original.name); }} aria-label={`Rename ${i.row.original.name}`}>
                    Rename
                  </Button>
                  <Button size="sm" variant="danger" onClick={() => setToDelete(i.row.original)} aria-label={`Delete ${i.row.original.name}`}>
                    Delete
                  </Button>
                </div>
              ),
            }),
          ]
        : []),
    ],
    [canEdit, compact],
  );

  if (list.isPending) return <Loading label="Loading datasets…" />;
  if (list.isError) return <QueryError error={list.error} what="the datasets" onRetry={() => void list.refetch()} />;
  return (
    <>
      <DataTable data={list.data} columns={columns} caption="Field-data datasets" getRowId={(d) => d.id} empty="No field data yet." />
      <Dialog open={renaming !== null} onClose={() => setRenaming(null)} title="Rename the dataset">
        <form
          className="space-y-3"
          onSubmit={(e) => {
            e.preventDefault();
            if (renaming) rename.mutate({ id: renaming.id, name: newName }, { onSuccess: () => setRenaming(null) });
          }}
        >
          <TextField label="Name" value={newName} onChange={(e) => setNewName(e.target.value)} maxLength={120} error={rename.error?.message} />
          <div className="flex justify-end gap-2">
            <Button variant="secondary" onClick={() => setRenaming(null)}>
              Cancel
            </Button>
            <Button type="submit" pending={rename.isPending}>
              Rename
            </Button>
          </div>
        </form>
      </Dialog>
      <ConfirmDialog
        open={toDelete !== null}
        onClose={() => setToDelete(null)}
        onConfirm={() => toDelete && remove.mutate(toDelete.id, { onSuccess: () => setToDelete(null) })}
        title={`Delete “${toDelete?.name ?? ""}”?`}
        confirmLabel="Delete the dataset"
        pending={remove.isPending}
        error={remove.error?.message}
      >
        The uploaded file and its {toDelete?.rowCount.toLocaleString("en")} rows are removed, with its bootstrap Runs. Life cycles started from it keep their values and name it as their source.
      </ConfirmDialog>
      {remove.isSuccess && <Alert tone="success">Dataset deleted.</Alert>}
    </>
  );
}
