/** Download a whole Study as one zip, made on the server. */
import { useState } from "react";
import { useDownloadStudyZip } from "../../api/reports";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Section } from "../../components/ui/layout";
import { downloadBlob } from "../../lib/download";

export function StudyExportPanel({ studyId }: { studyId: string }) {
  const download = useDownloadStudyZip();
  const [saved, setSaved] = useState<string | null>(null);
  return (
    <Section
      title="Export"
      description="Everything in this Study as one zip: each life cycle as a Stagewright JSON document, its matrices and results as CSV, and its report as PDF. Spreadsheet formulas in text cells are escaped."
    >
      <div className="space-y-3">
        <Button
          pending={download.isPending}
          onClick={() => {
            setSaved(null);
            download.mutate(studyId, {
              onSuccess: ({ blob, fileName }) => {
                downloadBlob(fileName, blob);
                setSaved(fileName);
              },
            });
          }}
        >
          {download.isPending ? "Making the zip…" : "Download the Study (zip)"}
        </Button>
        {download.isPending && <p className="text-sm text-ink/75">Each life cycle’s report is drawn on the server; a large Study takes a little while.</p>}
        {download.error && <Alert tone="error">{download.error.message}</Alert>}
        {saved && <p role="status" className="text-sm">Saved {saved}.</p>}
      </div>
    </Section>
  );
}
