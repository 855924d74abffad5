/**
 * Uploading a CSV into the Study's Field data in three steps: choose the file
 * and its kind (the server reads the first rows and suggests columns), map the
 * columns, then check the whole file (a report of every problem, nothing
 * stored) and import it (stored whole, or not at all).
 */
import { useEffect, useMemo, useState } from "react";
import { isApiError } from "../../api/client";
import { type DatasetKind, type DatasetSummary, type UploadParts, type UploadPreview, type ValidationReport, useCheckUpload, usePreviewUpload, useUploadDataset } from "../../api/field-data";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { SelectField, TextField } from "../../components/ui/field";
import { MAX_UPLOAD_BYTES, MAX_UPLOAD_ROWS, type CountsMapping, type Delimiter, type FatesMapping } from "../../../shared/schemas/field-data";
import { ValidationReportView } from "./validation-report";

const ROLES: Record<DatasetKind, { key: string; label: string; required: boolean; hint: string }[]> = {
  counts: [
    { key: "time", label: "Year or date", required: true, hint: "2014, or a date such as 2014-05-20" },
    { key: "count", label: "Count", required: true, hint: "the census count (≥ 0)" },
    { key: "site", label: "Site", required: false, hint: "one series per site" },
  ],
  "stage-fates": [
    { key: "individual", label: "Individual id", required: true, hint: "the mark or tag" },
    { key: "year", label: "Year", required: true, hint: "the census the row describes" },
    { key: "stage", label: "Stage", required: true, hint: "stage at this census" },
    { key: "fate", label: "Fate", required: true, hint: "stage at the next census, the dead word, or blank if unknown" },
    { key: "offspring", label: "Offspring", required: false, hint: "number of offspring produced" },
    { key: "site", label: "Site", required: false, hint: "one matrix per site as well" },
  ],
};

const DELIMITERS = [
  { value: "auto", label: "Detect" },
  { value: ",", label: "Comma ," },
  { value: ";", label: "Semicolon ;" },
  { value: "\t", label: "Tab" },
  { value: "|", label: "Vertical bar |" },
];

const MB = MAX_UPLOAD_BYTES / (1024 * 1024);

export function UploadWizard({ studyId, onImported }: { studyId: string; onImported: (d: DatasetSummary) => void }) {
  const [file, setFile] = useState<File | null>(null);
  const [kind, setKind] = useState<DatasetKind>("counts");
  const [delimiter, setDelimiter] = useState<Delimiter>("auto");
  const [decimal, setDecimal] = useState<"auto" | "comma" | "point">("auto");
  const [name, setName] = useState("");
  const [mapping, setMapping] = useState<Record<string, string>>({});
  const [stageColumns, setStageColumns] = useState<string[]>([]);
  const [stageOrder, setStageOrder] = useState("");
  const [deadValue, setDeadValue] = useState("dead");
  const [report, setReport] = useState<{ report: ValidationReport; stored: boolean } | null>(null);
  const [error, setError] = useState<string | null>(null);
  const preview = usePreviewUpload(studyId);
  const check = useCheckUpload(studyId);
  const upload = useUploadDataset(studyId);
  const p: UploadPreview | undefined = preview.data;

  const parseOptions = useMemo(() => ({ delimiter, decimalComma: decimal === "auto" ? ("auto" as const) : decimal === "comma" }), [delimiter, decimal]);

  // Read the first rows whenever the file or how to read it changes.
  useEffect(() => {
    if (!file) return;
    setReport(null);
    setError(null);
    preview.mutate(
      { file, options: parseOptions },
      {
        onError: (e) => setError(e.message),
      },
    );
  }, [file, parseOptions]);

  // Start from the suggested columns of the chosen kind.
  useEffect(() => {
    if (p) setMapping({ ...(p.suggested[kind] as Record<string, string>) });
    setStageColumns([]);
  }, [p, kind]);

  const missing = ROLES[kind].filter((r) => r.required && !mapping[r.key]).map((r) => r.label);

  // The mapping is checked by the server against the kind's schema; the form only leaves out empty choices.
  const parts = (): UploadParts => {
    const clean = Object.fromEntries(Object.entries(mapping).filter(([, v]) => v));
    const stages = stageOrder.split(",").map((s) => s.trim()).filter(Boolean);
    const common = { file: file!, name: name.trim() || file!.name.replace(/\.[^.]+$/, "") };
    if (kind === "counts") {
      const m = { ...clean, ...(stageColumns.length ? { stages: stageColumns.map((c) => ({ stage: c, column: c })) } : {}) };
      return { ...common, kind, mapping: m as CountsMapping, options: parseOptions };
    }
    return { ...common, kind, mapping: clean as FatesMapping, options: { ...parseOptions, deadValue, ...(stages.length ? { stages } : {}) } };
  };

  const onCheck = () => {
    setError(null);
    check.mutate(parts(), { onSuccess: (r) => setReport({ report: r, stored: false }), onError: (e) => setError(e.message) });
  };
  const onImport = () => {
    setError(null);
    upload.mutate(parts(), {
      onSuccess: (d) => {
        setReport(null);
        onImported(d);
      },
      onError: (e) => {
        const body = isApiError(e) ? (e.body as { report?: ValidationReport } | null) : null;
        if (body?.report) setReport({ report: body.report, stored: false });
        else setError(e.message);
      },
    });
  };

  const columnOptions = p?.header ?? [];
  const unmapped = columnOptions.filter((c) => !Object.values(mapping).includes(c));

  return (
    <div className="space-y-5">
      <p className="text-sm text-ink/80">
        One CSV file of at most {MB} MB and {MAX_UPLOAD_ROWS.toLocaleString("en")} rows, with a header row. Comma, semicolon, tab or vertical-bar separated; a decimal comma and a byte-order mark are fine.
      </p>
      <div className="grid gap-4 sm:grid-cols-2">
        <div className="space-y-1">
          <label htmlFor="field-data-file" className="block font-bold">
            CSV file
          </label>
          <input
            id="field-data-file"
            type="file"
            accept=".csv,.txt,.tsv,text/csv,text/plain"
            className="block w-full text-sm file:mr-3 file:rounded-md file:border file:border-ink/40 file:bg-white file:px-3 file:py-2"
            onChange={(e) => {
              const f = e.target.files?.[0] ?? null;
              setFile(f);
              if (f) setName(f.name.replace(/\.[^.]+$/, ""));
            }}
          />
        </div>
        <fieldset className="space-y-1">
          <legend className="font-bold">What the file holds</legend>
          <label className="mr-4 inline-flex items-center gap-2">
            <input type="radio" name="kind" value="counts" checked={kind === "counts"} onChange={() => setKind("counts")} /> Census counts
          </label>
          <label className="inline-flex items-center gap-2">
            <input type="radio" name="kind" value="stage-fates" checked={kind === "stage-fates"} onChange={() => setKind("stage-fates")} /> Stage fates of marked individuals
          </label>
        </fieldset>
        <SelectField label="Delimiter" value={delimiter} onChange={(e) => setDelimiter(e.target.value as Delimiter)}>
          {DELIMITERS.map((d) => (
            <option key={d.value} value={d.value}>
              {d.label}
            </option>
          ))}
        </SelectField>
        <SelectField label="Decimal mark" value={decimal} onChange={(e) => setDecimal(e.target.value as "auto" | "comma" | "point")}>
          <option value="auto">Detect</option>
          <option value="point">Point (1.5)</option>
          <option value="comma">Comma (1,5)</option>
        </SelectField>
      </div>

      {preview.isPending && <p className="text-sm">Reading the first rows…</p>}
      {error && <Alert tone="error">{error}</Alert>}

      {p && file && (
        <>
          {p.warning && <Alert tone="warning">{p.warning}</Alert>}
          <div>
            <h3 className="mb-1 font-bold">First rows</h3>
            <p className="mb-2 text-sm text-ink/75">
              Read as {p.delimiter === "\t" ? "tab" : `“${p.delimiter}”`}-separated, decimal {p.decimalComma ? "comma" : "point"}; about {p.lines.toLocaleString("en")} lines.
            </p>
            <div className="max-h-72 overflow-auto rounded-md border border-ink/15">
              <table className="w-full text-sm">
                <caption className="sr-only">First rows of the file</caption>
                <thead className="sticky top-0 bg-paper text-left">
                  <tr>
                    {p.header.map((h, k) => (
                      <th key={k} scope="col" className="px-3 py-2 whitespace-nowrap">
                        {h}
                      </th>
                    ))}
                  </tr>
                </thead>
                <tbody>
                  {p.rows.map((r, i) => (
                    <tr key={i} className="border-t border-ink/10">
                      {r.map((v, k) => (
                        <td key={k} className="px-3 py-1 whitespace-nowrap tabular-nums">
                          {v}
                        </td>
                      ))}
                    </tr>
                  ))}
                </tbody>
              </table>
            </div>
          </div>

          <div>
            <h3 className="mb-2 font-bold">Columns</h3>
            <div className="grid gap-3 sm:grid-cols-3">
              {ROLES[kind].map((role) => (
                <SelectField
                  key={`${kind}-${role.key}`}
                  label={`${role.label}${role.required ? "" : " (optional)"}`}
                  description={role.hint}
                  value={mapping[role.key] ?? ""}
                  onChange={(e) => setMapping((m) => ({ ...m, [role.key]: e.target.value }))}
                >
                  <option value="">{role.required ? "Choose a column" : "None"}</option>
                  {columnOptions.map((c) => (
                    <option key={c} value={c}>
                      {c}
                    </option>
                  ))}
                </SelectField>
              ))}
            </div>
            {kind === "counts" && unmapped.length > 0 && (
              <fieldset className="mt-3 space-y-1">
                <legend className="font-bold">Counts by stage (optional)</legend>
                <p className="text-sm text-ink/75">Tick columns that count one stage each; they are charted beside the total.</p>
                {unmapped.map((c) => (
                  <label key={c} className="mr-4 inline-flex items-center gap-2">
                    <input type="checkbox" checked={stageColumns.includes(c)} onChange={(e) => setStageColumns((s) => (e.target.checked ? [...s, c] : s.filter((x) => x !== c)))} /> {c}
                  </label>
                ))}
              </fieldset>
            )}
            {kind === "stage-fates" && (
              <div className="mt-3 grid gap-3 sm:grid-cols-2">
                <TextField label="Stages in life-cycle order (optional)" description="Comma-separated, youngest first, e.g. Eft, Subadult, Adult. Newborns enter the first. Without it, the order of first appearance is used." value={stageOrder} onChange={(e) => setStageOrder(e.target.value)} />
                <TextField label="Word for a death in the fate column" value={deadValue} onChange={(e) => setDeadValue(e.target.value)} />
              </div>
            )}
          </div>

          <TextField label="Dataset name" value={name} onChange={(e) => setName(e.target.value)} maxLength={120} />

          {missing.length > 0 && <p className="text-sm font-bold text-brick">Choose the column for: {missing.join(", ")}.</p>}
          <div className="flex flex-wrap gap-2">
            <Button variant="secondary" onClick={onCheck} pending={check.isPending} disabled={missing.length > 0}>
              Check the whole file
            </Button>
            <Button onClick={onImport} pending={upload.isPending} disabled={missing.length > 0}>
              Import
            </Button>
          </div>
          {report && <ValidationReportView report={report.report} stored={report.stored} />}
        </>
      )}
    </div>
  );
}
