/**
 * A whole Study as one zip: for each life cycle its Stagewright JSON, its
 * matrices and results as CSV (shared/export/csv.ts, the same escaping the
 * browser's downloads use) and its report PDF, with a README.txt listing
 * everything. Files are counted as they are made, and the export stops with
 * a 413 as soon as they pass the limit.
 */
import { zipSync, type Zippable } from "fflate";
import { fileStem, lifeCycleJson, matrixCsv, resultsCsv } from "../../shared/export/csv";
import { buildMatrices } from "../../shared/lifecycle";
import { asc, eq } from "drizzle-orm";
import type { Db } from "../db/client";
import { datasets } from "../db/schema";
import { HttpError } from "../http/errors";
import { reportPdf } from "../report/pdf";
import { listLifeCycles } from "./life-cycles";
import { buildReport } from "./report";
import { getStudy } from "./studies";

const encoder = new TextEncoder();
const mb = (bytes: number) => `${(bytes / 1_048_576).toFixed(1)} MB`;

export interface StudyExport {
  fileName: string;
  zip: Uint8Array;
}

export async function exportStudy(db: Db, studyId: string, userId: string, limitBytes: number): Promise<StudyExport> {
  const study = await getStudy(db, studyId, userId);
  const lifeCycles = await listLifeCycles(db, studyId);
  const files: Zippable = {};
  const listing: string[] = [];
  let total = 0;
  const add = (name: string, data: Uint8Array | string, what: string, compress = true) => {
    const bytes = typeof data === "string" ? encoder.encode(data) : data;
    total += bytes.length;
    if (total > limitBytes) {
      throw new HttpError(
        413,
        `This Study's export passed the limit of ${mb(limitBytes)} (at ${mb(total)}, with ${name}). Download the life cycles one at a time from their Export tab, or ask your administrator to raise EXPORT_LIMIT_MB.`,
      );
    }
    files[name] = compress ? bytes : [bytes, { level: 0 }];
    listing.push(`${name}\t${what}`);
  };

  const used = new Set<string>();
  for (const summary of lifeCycles) {
    const report = await buildReport(db, summary.id);
    const doc = report.document;
    let stem = fileStem(doc.name);
    for (let k = 2; used.has(stem); k++) stem = `${fileStem(doc.name)}-${k}`;
    used.add(stem);
    const dir = `life-cycles/${stem}`;
    const names = doc.stages.map((s) => s.name);
    add(`${dir}/${stem}.stagewright.json`, lifeCycleJson(doc), `“${doc.name}” as a Stagewright life-cycle document (format ${doc.stagewright})`);
    const m = buildMatrices(doc);
    if (m.errors.length === 0 && doc.stages.length > 0) {
      add(`${dir}/matrix-A.csv`, matrixCsv(m.A, names), "projection matrix A (rows: stage at t+1, columns: stage at t)");
      add(`${dir}/matrix-U.csv`, matrixCsv(m.U, names), "survival and growth part U of A");
      add(`${dir}/matrix-F.csv`, matrixCsv(m.F, names), "reproduction part F of A");
    }
    if (report.analysis) add(`${dir}/results.csv`, resultsCsv(doc, report.analysis), "λ, w, v, sensitivities, elasticities and life history");
    else listing.push(`${dir}/ (no matrices or results: ${report.analysisProblem ?? "the life cycle cannot be analysed"})`);
    add(`${dir}/report.pdf`, await reportPdf(report, "a4"), "the report (A4)", false);
  }

  // Field data exactly as uploaded (the bytes people sent), one folder per dataset.
  const rows = await db
    .select({ name: datasets.name, kind: datasets.kind, fileName: datasets.fileName, content: datasets.fileContent, rowCount: datasets.rowCount })
    .from(datasets)
    .where(eq(datasets.studyId, studyId))
    .orderBy(asc(datasets.name));
  const usedData = new Set<string>();
  for (const d of rows) {
    let stem = fileStem(d.name);
    for (let k = 2; usedData.has(stem); k++) stem = `${fileStem(d.name)}-${k}`;
    usedData.add(stem);
    const file = d.fileName.replace(/[/\\]/g, "_") || "upload.csv";
    add(`datasets/${stem}/${file}`, new Uint8Array(d.content), `dataset “${d.name}” (${d.kind}, ${d.rowCount} rows) as uploaded`);
  }

  const readme = [
    `Stagewright export of the Study “${study.name}”`,
    `Made ${new Date().toISOString()}; ${lifeCycles.length} life cycle${lifeCycles.length === 1 ? "" : "s"}, ${rows.length} dataset${rows.length === 1 ? "" : "s"}.`,
    "Datasets are the files exactly as uploaded (their own delimiter and encoding); the CSV escaping below applies to files Stagewright writes.",
    "",
    "CSV files: comma-separated, UTF-8, CRLF line ends. Text cells that begin with =, +, -, @, a tab or a carriage return",
    "are written with a leading ' so a spreadsheet shows them as text instead of running them as formulas. Numbers are plain numbers.",
    "",
    "Results support and do not replace expert judgement. Status listings and management decisions follow the rules of",
    "the responsible authority and peer review. Models are only as good as their data.",
    "",
    "Files:",
    ...listing,
    "",
  ].join("\r\n");
  add("README.txt", readme, "this file");
  return { fileName: `${fileStem(study.name)}-stagewright.zip`, zip: zipSync(files, { level: 6 }) };
}
