import { Disclosure, DisclosureButton, DisclosurePanel } from "@headlessui/react";
import { useActivity } from "../../api/activity";
import { buttonClasses } from "../../components/ui/button";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { TextLink } from "../../components/ui/text-link";
import { RelativeTime } from "../../components/ui/time";
import { paths } from "../../routes/paths";

function ActivityList({ studyId }: { studyId: string }) {
  const activity = useActivity(studyId);

  if (activity.isPending) return <Loading label="Loading activity…" />;
  if (activity.isError) return <QueryError error={activity.error} what="the activity" onRetry={() => activity.refetch()} />;
  if (activity.data.length === 0) return <p className="text-ink/75">Nothing has happened here yet.</p>;

  const events = [...activity.data].sort((a, b) => b.createdAt.localeCompare(a.createdAt));
  return (
    <ol className="divide-y divide-ink/10 text-sm">
      {events.map((event) => (
        <li key={event.id} className="py-2">
          <p>
            <span className="font-bold">{event.actorName ?? "Stagewright"}</span> {event.summary}
          </p>
          <p className="text-ink/75">
            <RelativeTime iso={event.createdAt} />
          </p>
        </li>
      ))}
    </ol>
  );
}

/**
 * The Study's audit trail, newest first. Folded by default: it is looked up
 * now and then, and unfolded it would repeat every name and address on the page.
 * It loads when opened.
 */
export function ActivityPanel({ studyId }: { studyId: string }) {
  return (
    <Disclosure as="section" className="rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
      {({ open }) => (
        <>
          <div className="flex flex-wrap items-start justify-between gap-3">
            <div className="space-y-1">
              <h2 className="text-xl font-bold">Activity</h2>
              <p className="text-sm text-ink/75">Who changed what in this Study, and when.</p>
            </div>
            <DisclosureButton className={buttonClasses("secondary", "sm")}>
              {open ? "Hide activity" : "Show activity"}
            </DisclosureButton>
          </div>
          <DisclosurePanel className="mt-3 space-y-3">
            <ActivityList studyId={studyId} />
          </DisclosurePanel>
          <p className="mt-3 text-sm">
            <TextLink to={paths.studyActivity(studyId)}>Open the full activity log with filters</TextLink>
          </p>
        </>
      )}
    </Disclosure>
  );
}
