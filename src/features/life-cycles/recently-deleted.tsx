import { Disclosure, DisclosureButton, DisclosurePanel } from "@headlessui/react";
import { type LifeCycleRecord, useDeletedLifeCycles, useUndeleteLifeCycle } from "../../api/life-cycles";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { QueryError } from "../../components/ui/query-error";
import { DateTime, RelativeTime } from "../../components/ui/time";

/** Life cycles deleted in the last 30 days, for editors to restore. Hidden when there are none. */
export function RecentlyDeleted({ studyId, onRestored }: { studyId: string; onRestored: (record: LifeCycleRecord) => void }) {
  const deleted = useDeletedLifeCycles(studyId, true);
  const restore = useUndeleteLifeCycle(studyId);

  if (deleted.isError) return <QueryError error={deleted.error} what="the recently deleted life cycles" onRetry={() => deleted.refetch()} />;
  if (!deleted.data || deleted.data.length === 0) return null;

  return (
    <Disclosure as="div" className="mt-4 border-t border-ink/15 pt-3">
      <DisclosureButton className="group flex items-center gap-2 rounded font-bold text-indigo">
        <span aria-hidden="true" className="inline-block transition-transform group-data-open:rotate-90">
          ▸
        </span>
        Recently deleted ({deleted.data.length})
      </DisclosureButton>
      <DisclosurePanel className="mt-2 space-y-2">
        <p className="text-sm text-ink/80">Deleted life cycles can be restored for 30 days.</p>
        {restore.isError && <Alert tone="error">The life cycle was not restored: {restore.error.message}</Alert>}
        <ul className="divide-y divide-ink/10">
          {deleted.data.map((item) => (
            <li key={item.id} className="flex flex-wrap items-center justify-between gap-2 py-2">
              <div className="min-w-0 text-sm">
                <p className="font-bold break-words">{item.name}</p>
                <p className="text-ink/80">
                  Deleted <RelativeTime iso={item.deletedAt} />
                  {item.deletedBy && <> by {item.deletedBy}</>}; restorable until <DateTime iso={item.recoverableUntil} />.
                </p>
              </div>
              <Button
                variant="secondary"
                size="sm"
                aria-label={`Restore “${item.name}”`}
                pending={restore.isPending && restore.variables === item.id}
                onClick={() => restore.mutate(item.id, { onSuccess: onRestored })}
              >
                Restore
              </Button>
            </li>
          ))}
        </ul>
      </DisclosurePanel>
    </Disclosure>
  );
}
