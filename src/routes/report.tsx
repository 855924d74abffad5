/**
 * A life cycle's report: a toolbar (which state, paper, print, PDF) over the
 * printable report. The toolbar and the app's frame are not printed.
 */
import { useState } from "react";
import { Link, useParams, useSearchParams } from "react-router";
import type { Paper } from "../../shared/schemas/report";
import { useDownloadReportPdf, useReport } from "../api/reports";
import { Alert } from "../components/ui/alert";
import { Button } from "../components/ui/button";
import { SelectField } from "../components/ui/field";
import { QueryError } from "../components/ui/query-error";
import { Loading } from "../components/ui/spinner";
import { ReportDocument } from "../features/report";
import { downloadBlob } from "../lib/download";
import { paths } from "./paths";

const PAGE_SIZE: Record<Paper, string> = { a4: "A4", letter: "letter" };

export function ReportPage() {
  const { lifeCycleId = "" } = useParams();
  const [search, setSearch] = useSearchParams();
  const snapshotId = search.get("snapshot");
  const report = useReport(lifeCycleId, snapshotId);
  const [paper, setPaper] = useState<Paper>("a4");
  const pdf = useDownloadReportPdf();

  return (
    <>
      <title>{`${report.data ? `Report: ${report.data.lifeCycle.name}` : "Report"} · Stagewright`}</title>
      {/* The printed page follows the paper chosen here; 18 mm margins leave room for binding. */}
      <style>{`@media print { @page { size: ${PAGE_SIZE[paper]}; margin: 18mm; } html { background: #fff; } }`}</style>
      <div className="mb-6 flex flex-wrap items-end gap-3 border-b border-ink/15 pb-4 print:hidden">
        <div className="mr-auto space-y-1">
          <Link to={paths.lifeCycle(lifeCycleId)} className="text-sm underline underline-offset-2 hover:text-indigo">
            ← Back to the life cycle
          </Link>
          <h1 className="text-2xl font-bold">Report</h1>
        </div>
        {report.data && (
          <SelectField
            label="State"
            value={snapshotId ?? ""}
            onChange={(e) => setSearch(e.target.value ? { snapshot: e.target.value } : {}, { replace: true })}
          >
            <option value="">Saved state now</option>
            {report.data.snapshots.map((s) => (
              <option key={s.id} value={s.id}>
                Snapshot #{s.number}: {s.message.length > 40 ? `${s.message.slice(0, 39)}…` : s.message}
              </option>
            ))}
          </SelectField>
        )}
        <SelectField label="Paper" value={paper} onChange={(e) => setPaper(e.target.value as Paper)}>
          <option value="a4">A4</option>
          <option value="letter">US Letter</option>
        </SelectField>
        <Button variant="secondary" onClick={() => window.print()} disabled={!report.data}>
          Print
        </Button>
        <Button
          pending={pdf.isPending}
          disabled={!report.data}
          onClick={() =>
            pdf.mutate({ lifeCycleId, snapshotId, paper }, { onSuccess: ({ blob, fileName }) => downloadBlob(fileName, blob) })
          }
        >
          {pdf.isPending ? "Making the PDF…" : "Download PDF"}
        </Button>
      </div>
      {pdf.error && (
        <div className="mb-4 print:hidden">
          <Alert tone="error">{pdf.error.message}</Alert>
        </div>
      )}
      {report.isPending ? (
        <Loading label="Drawing the report…" />
      ) : report.isError ? (
        <QueryError error={report.error} what="the report" onRetry={() => report.refetch()} />
      ) : (
        <ReportDocument report={report.data} />
      )}
    </>
  );
}
