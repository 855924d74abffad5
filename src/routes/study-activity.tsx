import { useParams, useSearchParams } from "react-router";
import type { ActivityFilters } from "../api/activity";
import { useStudy } from "../api/studies";
import { PageHeader } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { ActivityLog } from "../features/activity/activity-log";
import { paths } from "./paths";

const FILTER_KEYS = ["kind", "actorId", "lifeCycleId", "from", "to"] as const;

/** A Study's activity log; the filters live in the address, so a filtered view can be shared. */
export function StudyActivityPage() {
  const { studyId = "" } = useParams();
  const study = useStudy(studyId);
  const [search, setSearch] = useSearchParams();
  const filters: ActivityFilters = Object.fromEntries(FILTER_KEYS.map((k) => [k, search.get(k) ?? ""]).filter(([, v]) => v));
  const change = (next: ActivityFilters) =>
    setSearch(new URLSearchParams(Object.entries(next).filter((e): e is [string, string] => typeof e[1] === "string" && e[1] !== "")), { replace: true });
  return (
    <>
      <title>{`Activity · ${study.name} · Stagewright`}</title>
      <PageHeader
        eyebrow={<TextLink to={paths.study(study.id)}>{study.name}</TextLink>}
        title="Activity log"
        subtitle="Who created, edited, snapshotted, commented, reviewed, invited and changed roles — each recorded with the change itself."
      />
      <ActivityLog studyId={study.id} filters={filters} onFiltersChange={change} />
    </>
  );
}
