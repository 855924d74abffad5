import { Disclosure, DisclosureButton, DisclosurePanel } from "@headlessui/react";
import { createColumnHelper } from "@tanstack/react-table";
import type { Study } from "../../../shared/schemas";
import { useStudies } from "../../api/studies";
import { Badge } from "../../components/ui/badge";
import { DataTable } from "../../components/ui/data-table";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { TextLink } from "../../components/ui/text-link";
import { RelativeTime } from "../../components/ui/time";
import { ROLE_LABELS } from "../../lib/roles";
import { paths } from "../../routes/paths";

const column = createColumnHelper<Study>();

const columns = [
  column.accessor("name", {
    header: "Study",
    cell: (info) => (
      <div className="min-w-48">
        <TextLink to={paths.study(info.row.original.id)}>{info.getValue()}</TextLink>
        {info.row.original.description && (
          <p className="line-clamp-1 text-ink/75">{info.row.original.description}</p>
        )}
      </div>
    ),
  }),
  column.accessor("role", {
    header: "Your role",
    cell: (info) => <Badge tone={info.getValue() === "owner" ? "accent" : "neutral"}>{ROLE_LABELS[info.getValue()]}</Badge>,
  }),
  column.accessor("memberCount", { header: "Members", cell: (info) => info.getValue() }),
  column.accessor("createdAt", { header: "Created", cell: (info) => <RelativeTime iso={info.getValue()} /> }),
];

export function StudiesList() {
  const studies = useStudies();

  if (studies.isPending) return <Loading label="Loading your Studies…" />;
  if (studies.isError) return <QueryError error={studies.error} what="your Studies" onRetry={() => studies.refetch()} />;

  const active = studies.data.filter((study) => !study.archivedAt);
  const archived = studies.data.filter((study) => study.archivedAt);

  return (
    <div className="space-y-6">
      <DataTable
        data={active}
        columns={columns}
        caption="Your Studies"
        getRowId={(study) => study.id}
        initialSorting={[{ id: "name", desc: false }]}
        empty={
          <p>
            {archived.length > 0
              ? "You have no active Studies; the archived ones are below."
              : "You are not in any Study yet. Create one, or ask a Study’s owner to invite you."}
          </p>
        }
      />
      {archived.length > 0 && (
        <Disclosure as="section" className="rounded-lg border border-ink/15 bg-white">
          <DisclosureButton className="group flex w-full items-center gap-2 rounded-lg px-4 py-3 text-left font-bold">
            <svg viewBox="0 0 16 16" aria-hidden="true" className="size-4 transition-transform group-data-open:rotate-90">
              <path d="M6 3.5 10.5 8 6 12.5" fill="none" stroke="currentColor" strokeWidth="2" strokeLinecap="round" strokeLinejoin="round" />
            </svg>
            Archived Studies ({archived.length})
          </DisclosureButton>
          <DisclosurePanel className="border-t border-ink/10 px-4 pb-4">
            <p className="py-2 text-sm text-ink/75">Archived Studies keep everything they held. Their owners can restore them.</p>
            <DataTable
              data={archived}
              columns={columns}
              caption="Archived Studies"
              getRowId={(study) => study.id}
              initialSorting={[{ id: "name", desc: false }]}
            />
          </DisclosurePanel>
        </Disclosure>
      )}
    </div>
  );
}
