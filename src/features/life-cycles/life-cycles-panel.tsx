import { createColumnHelper } from "@tanstack/react-table";
import { type LifeCycleSummary, useCreateLifeCycle, useLifeCycles } from "../../api/life-cycles";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { DataTable } from "../../components/ui/data-table";
import { Section } from "../../components/ui/layout";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { RelativeTime } from "../../components/ui/time";

const column = createColumnHelper<LifeCycleSummary>();

const columns = [
  column.accessor("name", { header: "Name", cell: (info) => <span className="font-bold">{info.getValue()}</span> }),
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
];

const BLANK_NAME = "Untitled life cycle";

/** A name no other life cycle of the Study has yet: "Untitled life cycle", then "… 2", "… 3". */
function nextBlankName(existing: readonly LifeCycleSummary[]): string {
  const taken = new Set(existing.map((lifeCycle) => lifeCycle.name));
  if (!taken.has(BLANK_NAME)) return BLANK_NAME;
  let n = 2;
  while (taken.has(`${BLANK_NAME} ${n}`)) n += 1;
  return `${BLANK_NAME} ${n}`;
}

/** The Study's life cycles; editors and owners start a blank one. */
export function LifeCyclesPanel({ studyId, canCreate }: { studyId: string; canCreate: boolean }) {
  const lifeCycles = useLifeCycles(studyId);
  const create = useCreateLifeCycle(studyId);

  return (
    <Section
      title="Life cycles"
      description="Each life cycle is one model: its stages, arrows and rates."
      actions={
        canCreate && (
          <Button
            pending={create.isPending}
            disabled={!lifeCycles.isSuccess}
            onClick={() => lifeCycles.data && create.mutate({ name: nextBlankName(lifeCycles.data) })}
          >
            New life cycle
          </Button>
        )
      }
    >
      {create.isError && (
        <Alert tone="error" className="mb-3" title="The life cycle was not created.">
          {create.error.message}
        </Alert>
      )}
      {create.isSuccess && (
        <Alert tone="success" className="mb-3">
          Created &ldquo;{create.data.name}&rdquo;.
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
          empty={<p>No life cycles yet.{canCreate ? " Start one with “New life cycle”." : ""}</p>}
        />
      )}
    </Section>
  );
}
