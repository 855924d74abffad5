import { useParams } from "react-router";
import { roleAtLeast } from "../../shared/schemas";
import { useStudy } from "../api/studies";
import { ActivityPanel } from "../features/activity/activity-panel";
import { FieldDataSection } from "../features/field-data/field-data-section";
import { InvitationsPanel } from "../features/invitations/invitations-panel";
import { LifeCyclesPanel } from "../features/life-cycles/life-cycles-panel";
import { MembersPanel } from "../features/members/members-panel";
import { StudyExportPanel } from "../features/report";
import { StudyDetailsForm } from "../features/studies/study-details-form";
import { StudyHeader } from "../features/studies/study-header";

/** One Study: its life cycles, people and history. Owner-only panels are hidden from other roles. */
export function StudyPage() {
  const { studyId = "" } = useParams();
  const study = useStudy(studyId);
  const isOwner = study.role === "owner";

  return (
    <>
      <title>{`${study.name} · Stagewright`}</title>
      <StudyHeader study={study} />
      <div className="grid gap-6 lg:grid-cols-[minmax(0,2fr)_minmax(0,1fr)]">
        <div className="min-w-0 space-y-6">
          <LifeCyclesPanel studyId={study.id} canCreate={roleAtLeast(study.role, "editor")} />
          <FieldDataSection studyId={study.id} canEdit={roleAtLeast(study.role, "editor")} />
          <MembersPanel study={study} />
          {isOwner && <InvitationsPanel studyId={study.id} />}
        </div>
        <div className="min-w-0 space-y-6">
          {isOwner && <StudyDetailsForm study={study} />}
          <StudyExportPanel studyId={study.id} />
          <ActivityPanel studyId={study.id} />
        </div>
      </div>
    </>
  );
}
