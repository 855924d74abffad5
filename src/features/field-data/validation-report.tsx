import type { ValidationReport } from "../../api/field-data";
import { Alert } from "../../components/ui/alert";

/** The row-level report of a checked file: line, column, problem. */
export function ValidationReportView({ report, stored }: { report: ValidationReport; stored: boolean }) {
  if (report.ok) {
    return (
      <Alert tone="success" title="No problems found">
        {report.rows.toLocaleString("en")} rows read{stored ? " and stored" : ""}; {report.delimiter === "\t" ? "tab" : `“${report.delimiter}”`}-separated, decimal {report.decimalComma ? "comma" : "point"}.
        {!stored && " Nothing is stored until you import the file."}
      </Alert>
    );
  }
  return (
    <div className="space-y-2">
      <Alert tone="error" title={`${report.problemCount.toLocaleString("en")} problem${report.problemCount === 1 ? "" : "s"}: nothing was stored`}>
        Fix these in the file (or choose other columns or options above), then check again.
        {report.problemCount > report.problems.length && ` The first ${report.problems.length} are listed.`}
      </Alert>
      <div className="max-h-96 overflow-auto rounded-md border border-ink/15">
        <table className="w-full text-sm">
          <caption className="sr-only">Problems found in the file</caption>
          <thead className="sticky top-0 bg-paper text-left">
            <tr>
              <th scope="col" className="px-3 py-2">Line</th>
              <th scope="col" className="px-3 py-2">Column</th>
              <th scope="col" className="px-3 py-2">Problem</th>
            </tr>
          </thead>
          <tbody>
            {report.problems.map((p, k) => (
              <tr key={k} className="border-t border-ink/10 align-top">
                <td className="px-3 py-1.5 tabular-nums">{p.line}</td>
                <td className="px-3 py-1.5">{p.column ?? "—"}</td>
                <td className="px-3 py-1.5">{p.problem}</td>
              </tr>
            ))}
          </tbody>
        </table>
      </div>
    </div>
  );
}
