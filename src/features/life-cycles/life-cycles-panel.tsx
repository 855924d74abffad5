import { createColumnHelper } from "@tanstack/react-table";
import { Suspense, lazy, useMemo, useState } from "react";
import { useNavigate } from "react-router";
import {
  type LifeCycleRecord,
  type LifeCycleSummary,
  useCreateLifeCycle,
  useDeleteLifeCycle,
  useDuplicateLifeCycle,
  useLifeCycles,
} from "../../api/life-cycles";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { DataTable } from "../../components/ui/data-table";
import { ConfirmDialog } from "../../components/ui/dialog";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { TextLink } from "../../components/ui/text-link";
import { RelativeTime } from "../../components/ui/time";
import { paths } from "../../routes/paths";
import { RecentlyDeleted } from "./recently-deleted";

// The templates, CSV reader and document checks load only when the dialog opens.
const CreateLifeCycleDialog = lazy(() => import("./create-life-cycle-dialog").then((m) => ({ default: m.CreateLifeCycleDialog })));

const column = createColumnHelper<LifeCycleSummary>();

const BLANK_NAME = "Untitled life cycle";

/** A name no other life cycle of the Study has yet: "Untitled life cycle", then "… 2", "… 3". */
function nextBlankName(existing: readonly LifeCycleSummary[]): string {
  const taken = new Set(existing.map((lifeCycle) => lifeCycle.name));
  if (!taken.has(BLANK_NAME)) return BLANK_NAME;
  let n = 2;
  while (taken.has(`${BLANK_NAME} ${n}`)) n += 1;
  return `${BLANK_NAME} ${n}`;
}

/** The Study's life cycles; editors and owners create, duplicate, delete and restore them. */
export function LifeCyclesPanel({ studyId, canCreate }: { studyId: string; canCreate: boolean }) {
  const lifeCycles = useLifeCycles(studyId);
  const create = useCreateLifeCycle(studyId);
  const duplicate = useDuplicateLifeCycle(studyId);
  const remove = useDeleteLifeCycle(studyId);
  const navigate = useNavigate();
  const [dialogOpen, setDialogOpen] = useState(false);
  const [toDelete, setToDelete] = useState<LifeCycleSummary | null>(null);
  const [message, setMessage] = useState<{ tone: "success" | "error"; text: string; link?: LifeCycleRecord } | null>(null);

  const open = (record: LifeCycleRecord) => navigate(paths.lifeCycle(record.id));

  const columns = useMemo(
    () => [
      column.accessor("name", {
        header: "Name",
        cell: (info) => <TextLink to={paths.lifeCycle(info.row.original.id)}>{info.getValue()}</TextLink>,
      }),
      column.accessor("stageCount", { header: "Stages", cell: (info) => <span className="tabular-nums">{info.getValue()}</span> }),
      column.accessor("version", { header: "Version", cell: (info) => <span className="tabular-nums">{info.getValue()}</span> }),
      column.accessor("updatedAt", {
        header: "Updated",
        cell: (info) => (
          <>
            <RelativeTime iso={info.getValue()} />
            {info.row.original.updatedBy && <span className="text-ink/75"> by {info.row.original.updatedBy}</span>}
          </>
        ),
      }),
      ...(canCreate
        ? [
            column.display({
              id: "actions",
              header: () => <span className="sr-only">Actions</span>,
              cell: (info) => {
                const lifeCycle = info.row.original;
                return (
                  <div className="flex justify-end gap-1">
                    <Button
                      variant="secondary"
                      size="sm"
                      aria-label={`Duplicate “${lifeCycle.name}”`}
                      pending={duplicate.isPending && duplicate.variables?.lifeCycleId === lifeCycle.id}
                      onClick={() =>
                        duplicate.mutate(
                          { lifeCycleId: lifeCycle.id },
                          {
                            onSuccess: (copy) => setMessage({ tone: "success", text: `Duplicated “${lifeCycle.name}” as “${copy.name}”.`, link: copy }),
                            onError: (error) => setMessage({ tone: "error", text: `“${lifeCycle.name}” was not duplicated: ${error.message}` }),
                          },
                        )
                      }
                    >
                      Duplicate
                    </Button>
                    <Button variant="secondary" size="sm" aria-label={`Delete “${lifeCycle.name}”`} onClick={() => setToDelete(lifeCycle)}>
                      Delete
                    </Button>
                  </div>
                );
              },
            }),
          ]
        : []),
    ],
    [canCreate, duplicate],
  );

  return (
    <Section
      title="Life cycles"
      description="Each life cycle is one model: its stages, arrows and rates."
      actions={
        canCreate && (
          <>
            <Button
              pending={create.isPending}
              disabled={!lifeCycles.isSuccess}
              onClick={() => lifeCycles.data && create.mutate({ name: nextBlankName(lifeCycles.data) }, { onSuccess: open })}
            >
              New life cycle
            </Button>
            <Button variant="secondary" onClick={() => setDialogOpen(true)}>
              From a template or file…
            </Button>
          </>
        )
      }
    >
      {create.isError && (
        <Alert tone="error" className="mb-3" title="The life cycle was not created.">
          {create.error.message}
        </Alert>
      )}
      {message && (
        <Alert tone={message.tone} className="mb-3">
          {message.text}{" "}
          {message.link && <TextLink to={paths.lifeCycle(message.link.id)}>Open “{message.link.name}”</TextLink>}
        </Alert>
      )}
      {lifeCycles.isPending ? (
        <Loading label="Loading life cycles…" />
      ) : lifeCycles.isError ? (
        <QueryError error={lifeCycles.error} what="the life cycles" onRetry={() => lifeCycles.refetch()} />
      ) : (
        <DataTable
          data={lifeCycles.data}
          columns={columns}
          caption="Life cycles"
          getRowId={(lifeCycle) => lifeCycle.id}
          initialSorting={[{ id: "updatedAt", desc: true }]}
          empty={<p>No life cycles yet.{canCreate ? " Start one with “New life cycle”, from a template, or from a matrix or file." : ""}</p>}
        />
      )}
      {canCreate && <RecentlyDeleted studyId={studyId} onRestored={(record) => setMessage({ tone: "success", text: `Restored “${record.name}”.`, link: record })} />}

      {canCreate && dialogOpen && (
        <Suspense fallback={null}>
          <CreateLifeCycleDialog studyId={studyId} open={dialogOpen} onClose={() => setDialogOpen(false)} onCreated={open} />
        </Suspense>
      )}
      <ConfirmDialog
        open={toDelete !== null}
        onClose={() => {
          setToDelete(null);
          remove.reset();
        }}
        onConfirm={() =>
          toDelete &&
          remove.mutate(toDelete.id, {
            onSuccess: () => {
              setMessage({ tone: "success", text: `Deleted “${toDelete.name}”. Editors can restore it from “Recently deleted” for 30 days.` });
              setToDelete(null);
            },
          })
        }
        title={`Delete “${toDelete?.name ?? ""}”?`}
        confirmLabel="Delete life cycle"
        pending={remove.isPending}
        error={remove.isError ? remove.error.message : null}
      >
        <p>
          The life cycle and its snapshots leave the list. Editors of this Study can restore it from “Recently deleted” for 30 days; after that it is
          gone for good.
        </p>
      </ConfirmDialog>
    </Section>
  );
}
