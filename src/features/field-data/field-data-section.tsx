import { ButtonLink } from "../../components/ui/button";
import { Section } from "../../components/ui/layout";
import { paths } from "../../routes/paths";
import { DatasetsTable } from "./datasets-panel";

/** The Field data block of a Study page: its datasets and the way to upload more. */
export function FieldDataSection({ studyId, canEdit }: { studyId: string; canEdit: boolean }) {
  return (
    <Section
      title="Field data"
      description="Census counts and records of marked individuals, with their analyses."
      actions={
        <ButtonLink variant="secondary" to={paths.fieldData(studyId)}>
          {canEdit ? "Open Field data and upload" : "Open Field data"}
        </ButtonLink>
      }
    >
      <DatasetsTable studyId={studyId} canEdit={false} compact />
    </Section>
  );
}
