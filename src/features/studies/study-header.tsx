import { type Study, roleAtLeast } from "../../../shared/schemas";
import { Alert } from "../../components/ui/alert";
import { Badge } from "../../components/ui/badge";
import { PageHeader } from "../../components/ui/layout";
import { RelativeTime } from "../../components/ui/time";
import { ROLE_LABELS } from "../../lib/roles";

export function StudyHeader({ study }: { study: Study }) {
  return (
    <>
      <PageHeader
        eyebrow="Study"
        title={study.name}
        subtitle={
          <div className="space-y-2">
            {study.description && <p className="max-w-prose whitespace-pre-line">{study.description}</p>}
            <p className="flex flex-wrap items-center gap-x-3 gap-y-1 text-sm text-ink/75">
              <span>
                Your role: <Badge tone={roleAtLeast(study.role, "owner") ? "accent" : "neutral"}>{ROLE_LABELS[study.role]}</Badge>
              </span>
              <span>
                {study.memberCount} {study.memberCount === 1 ? "member" : "members"}
              </span>
              <span>
                Created <RelativeTime iso={study.createdAt} />
              </span>
            </p>
          </div>
        }
      />
      {study.archivedAt && (
        <Alert tone="warning" className="mb-6" live={false} title="This Study is archived.">
          It was archived <RelativeTime iso={study.archivedAt} />.
          {study.role === "owner" ? " Restore it under Study details to work in it again." : " An owner can restore it."}
        </Alert>
      )}
    </>
  );
}
