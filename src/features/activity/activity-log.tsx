import { useActivityLog, type ActivityFilters } from "../../api/activity";
import { useLifeCycles } from "../../api/life-cycles";
import { useMembers } from "../../api/members";
import { Button } from "../../components/ui/button";
import { SelectField, TextField } from "../../components/ui/field";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { DateTime } from "../../components/ui/time";
import { ACTIVITY_KINDS } from "../../../shared/schemas/review";

const KIND_LABELS: Record<(typeof ACTIVITY_KINDS)[number], string> = {
  study: "Study details",
  member: "Members and roles",
  invitation: "Invitations",
  life_cycle: "Life-cycle edits",
  snapshot: "Snapshots",
  comment: "Comments",
  review: "Reviews",
  run: "Runs",
};

interface ActivityLogProps {
  studyId: string;
  filters: ActivityFilters;
  onFiltersChange: (filters: ActivityFilters) => void;
}

/** The Study's activity log with filters (kind, person, life cycle, dates), newest first, a page at a time. */
export function ActivityLog({ studyId, filters, onFiltersChange }: ActivityLogProps) {
  const log = useActivityLog(studyId, filters);
  const members = useMembers(studyId);
  const lifeCycles = useLifeCycles(studyId);
  const set = (key: keyof ActivityFilters, value: string) => onFiltersChange({ ...filters, [key]: value });
  const any = Object.values(filters).some((v) => v);
  const badDates = filters.from && filters.to && filters.from > filters.to;

  return (
    <div className="space-y-4">
      <form className="grid gap-3 rounded-lg border border-ink/15 bg-white p-4 shadow-sm sm:grid-cols-2 lg:grid-cols-5" onSubmit={(e) => e.preventDefault()} aria-label="Filters">
        <SelectField label="What" value={filters.kind ?? ""} onChange={(e) => set("kind", e.target.value)}>
          <option value="">Everything</option>
          {ACTIVITY_KINDS.map((k) => (
            <option key={k} value={k}>
              {KIND_LABELS[k]}
            </option>
          ))}
        </SelectField>
        <SelectField label="Who" value={filters.actorId ?? ""} onChange={(e) => set("actorId", e.target.value)}>
          <option value="">Anyone</option>
          {(members.data ?? []).map((m) => (
            <option key={m.userId} value={m.userId}>
              {m.name}
            </option>
          ))}
        </SelectField>
        <SelectField label="Life cycle" value={filters.lifeCycleId ?? ""} onChange={(e) => set("lifeCycleId", e.target.value)}>
          <option value="">Any</option>
          {(lifeCycles.data ?? []).map((lc) => (
            <option key={lc.id} value={lc.id}>
              {lc.name}
            </option>
          ))}
        </SelectField>
        <TextField label="From" type="date" value={filters.from ?? ""} onChange={(e) => set("from", e.target.value)} />
        <TextField label="To" type="date" value={filters.to ?? ""} onChange={(e) => set("to", e.target.value)} error={badDates ? "“To” is before “From”." : undefined} />
        {any && (
          <div className="sm:col-span-2 lg:col-span-5">
            <Button variant="quiet" size="sm" onClick={() => onFiltersChange({})}>
              Clear the filters
            </Button>
          </div>
        )}
      </form>

      {log.isPending ? (
        <Loading label="Loading activity…" />
      ) : log.isError ? (
        <QueryError error={log.error} what="the activity" onRetry={() => log.refetch()} />
      ) : log.data.pages[0]!.length === 0 ? (
        <p className="text-ink/75">{any ? "Nothing matches these filters." : "Nothing has happened here yet."}</p>
      ) : (
        <>
          <table className="w-full border-collapse text-left text-sm">
            <caption className="sr-only">Activity, newest first</caption>
            <thead>
              <tr className="border-b-2 border-ink/20">
                <th scope="col" className="px-2 py-2 whitespace-nowrap">
                  When
                </th>
                <th scope="col" className="px-2 py-2">
                  Who
                </th>
                <th scope="col" className="px-2 py-2">
                  What
                </th>
              </tr>
            </thead>
            <tbody>
              {log.data.pages.flat().map((e) => (
                <tr key={e.id} className="border-b border-ink/10 align-top">
                  <td className="px-2 py-2 whitespace-nowrap text-ink/80">
                    <DateTime iso={e.createdAt} />
                  </td>
                  <td className="px-2 py-2 font-bold">{e.actorName ?? "Stagewright"}</td>
                  <td className="px-2 py-2">{e.summary}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {log.hasNextPage && (
            <Button variant="secondary" onClick={() => void log.fetchNextPage()} pending={log.isFetchingNextPage}>
              Show older activity
            </Button>
          )}
        </>
      )}
    </div>
  );
}
