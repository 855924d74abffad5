import { useState } from "react";
import { useNavigate, useParams } from "react-router";
import { roleAtLeast } from "../../shared/schemas";
import { useStudy } from "../api/studies";
import { Button } from "../components/ui/button";
import { PageHeader, Section } from "../components/ui/layout";
import { TextLink } from "../components/ui/text-link";
import { DatasetsTable, UploadWizard } from "../features/field-data";
import { paths } from "./paths";

/** A Study's Field data: its datasets, and (for editors) uploading a new one. */
export function FieldDataPage() {
  const { studyId = "" } = useParams();
  const study = useStudy(studyId);
  const canEdit = roleAtLeast(study.role, "editor");
  const [uploading, setUploading] = useState(false);
  const navigate = useNavigate();
  return (
    <>
      <title>{`Field data · ${study.name} · Stagewright`}</title>
      <PageHeader
        eyebrow={<TextLink to={paths.study(study.id)}>{study.name}</TextLink>}
        title="Field data"
        subtitle="Census counts and stage fates of marked individuals: growth, viability and matrices estimated from them."
        actions={canEdit && !uploading ? <Button onClick={() => setUploading(true)}>Upload a CSV file</Button> : undefined}
      />
      <div className="space-y-6">
        {canEdit && uploading && (
          <Section title="Upload a CSV file" actions={<Button variant="quiet" onClick={() => setUploading(false)}>Close</Button>}>
            <UploadWizard studyId={study.id} onImported={(d) => navigate(paths.dataset(d.id))} />
          </Section>
        )}
        <Section title="Datasets" description={canEdit ? undefined : "Editors and owners upload data; you can read every analysis."}>
          <DatasetsTable studyId={study.id} canEdit={canEdit} />
        </Section>
      </div>
    </>
  );
}
