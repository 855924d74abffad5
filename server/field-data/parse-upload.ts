/**
 * Reads an uploaded CSV: refuses empty and binary files, decodes the text
 * (UTF-8, with a Windows-1252 fallback), finds the delimiter and decimal mark
 * unless given, and streams the records through csv-parse into the checker
 * of the dataset's kind. Returns the report and, when it is clean, the columns.
 */
import { CsvError, parse, type Options } from "csv-parse";
import { Readable } from "node:stream";
import {
  CountsChecker,
  FatesChecker,
  resolveColumns,
  sniffDecimalComma,
  sniffDelimiter,
  wrongDelimiterProblem,
  type CountsColumns,
  type FateColumns,
  type RecordProblem,
} from "../../shared/fielddata";
import {
  MAX_REPORTED_PROBLEMS,
  MAX_UPLOAD_ROWS,
  PREVIEW_ROWS,
  type CountsMapping,
  type FatesMapping,
  type ParseOptions,
  type UploadPreview,
  type UploadRequest,
  type ValidationReport,
} from "../../shared/schemas/field-data";

const CHUNK = 64 * 1024;

export interface DecodedFile {
  text: string;
  delimiter: string;
  decimalComma: boolean;
}

/** Text of the file, or the one problem that stops reading it at all. */
export function decodeFile(buffer: Buffer, options: ParseOptions): { file: DecodedFile } | { problem: RecordProblem } {
  if (buffer.length === 0 || buffer.toString("utf8").replace(/^\uFEFF/, "").trim() === "") {
    return { problem: { line: 1, column: null, problem: "The file is empty." } };
  }
  const head = buffer.subarray(0, 8192);
  if (head.includes(0)) {
    return { problem: { line: 1, column: null, problem: "This is not a text file (it contains binary data). Save the sheet as CSV (comma- or semicolon-separated text) and upload that." } };
  }
  // A NUL byte further on: the database cannot store it in a text value, so it is the file's problem, named by line.
  const nul = buffer.indexOf(0);
  if (nul >= 0) {
    let line = 1;
    for (let k = buffer.indexOf(10); k >= 0 && k < nul; k = buffer.indexOf(10, k + 1)) line++;
    return { problem: { line, column: null, problem: "This line holds a NUL character (byte 0), which a CSV file cannot contain; save the sheet as CSV again and upload that." } };
  }
  let text: string;
  try {
    text = new TextDecoder("utf-8", { fatal: true }).decode(buffer);
  } catch {
    text = new TextDecoder("windows-1252").decode(buffer);
  }
  text = text.replace(/^\uFEFF/, "");
  const delimiter = options.delimiter === "auto" ? sniffDelimiter(text) : options.delimiter;
  const decimalComma = options.decimalComma === "auto" ? sniffDecimalComma(text, delimiter) : options.decimalComma;
  if (decimalComma && delimiter === ",") {
    return { problem: { line: 1, column: null, problem: "A decimal comma cannot be used when the comma is also the delimiter; choose a semicolon or tab delimiter." } };
  }
  return { file: { text, delimiter, decimalComma } };
}

async function* records(text: string, delimiter: string): AsyncGenerator<{ values: string[]; line: number }> {
  const chunks = function* () {
    for (let k = 0; k < text.length; k += CHUNK) yield text.slice(k, k + CHUNK);
  };
  const parser = Readable.from(chunks()).pipe(
    // on_record pairs each record with the line it ends on, without a copy of the parser's whole state per record.
    parse({ delimiter, bom: true, relax_column_count: true, skip_empty_lines: true, skip_records_with_empty_values: true, on_record: (record: string[], context: { lines: number }) => [record, context.lines] } as unknown as Options),
  );
  for await (const [values, line] of parser as AsyncIterable<[string[], number]>) yield { values, line };
}

/** Problems csv-parse itself raises (an unclosed quote, say), as a report line. */
function parserProblem(err: unknown): RecordProblem | null {
  // Every error csv-parse raises is the file's problem (INVALID_OPENING_QUOTE, for one, has no CSV_ prefix).
  if (!(err instanceof CsvError)) return null;
  const e = err as { code?: unknown; message?: unknown; lines?: unknown };
  const line = typeof e.lines === "number" ? e.lines : 1;
  const why = e.code === "CSV_QUOTE_NOT_CLOSED" ? "A double quote opened here is never closed." : e.code === "CSV_INVALID_CLOSING_QUOTE" ? "A closing double quote is followed by other characters; quote the whole value."
    : e.code === "INVALID_OPENING_QUOTE" ? "A double quote appears inside a value that does not start with one; quote the whole value and write the quote inside it twice (\"\")."
    : String(e.message);
  return { line, column: null, problem: why };
}

/** The first rows and a suggested mapping, for the column-mapping step. */
export async function previewFile(buffer: Buffer, options: ParseOptions): Promise<UploadPreview | RecordProblem> {
  const decoded = decodeFile(buffer, options);
  if ("problem" in decoded) return decoded.problem;
  const { text, delimiter, decimalComma } = decoded.file;
  const rows: string[][] = [];
  let header: string[] | null = null;
  try {
    for await (const r of records(text.slice(0, 256 * 1024), delimiter)) {
      if (!header) header = r.values.map((v) => v.trim());
      else rows.push(r.values);
      if (rows.length >= PREVIEW_ROWS) break;
    }
  } catch (err) {
    const p = parserProblem(err);
    if (p) return p;
    throw err;
  }
  if (!header) return { line: 1, column: null, problem: "The file is empty." };
  const wrong = wrongDelimiterProblem(header, delimiter);
  let lines = 0;
  for (let k = text.indexOf("\n"); k >= 0; k = text.indexOf("\n", k + 1)) lines++;
  if (!text.endsWith("\n")) lines++;
  const preview: UploadPreview = { delimiter, decimalComma, header, rows, suggested: suggestMapping(header), lines };
  return wrong ? { ...preview, warning: wrong.problem } : preview;
}

const ALIASES: Record<string, string[]> = {
  time: ["year", "date", "census", "time", "season"],
  count: ["count", "n", "total", "abundance", "number", "individuals"],
  site: ["site", "population", "pop", "location", "plot"],
  individual: ["individual", "id", "tag", "mark", "animal", "plant", "individual id"],
  stage: ["stage", "stage now", "class", "state"],
  fate: ["fate", "next stage", "stage next", "next", "stage at next census", "next_stage"],
  offspring: ["offspring", "recruits", "young", "fecundity", "eggs", "seeds", "offspring count"],
};

function suggestMapping(header: string[]): UploadPreview["suggested"] {
  const norm = header.map((h) => h.trim().toLowerCase().replace(/[_.]+/g, " "));
  const find = (role: string) => {
    const k = norm.findIndex((h) => ALIASES[role]!.includes(h));
    return k >= 0 ? header[k] : undefined;
  };
  const counts: Partial<CountsMapping> = {};
  const fates: Partial<FatesMapping> = {};
  const time = find("time");
  const count = find("count");
  const site = find("site");
  if (time) counts.time = time;
  if (count) counts.count = count;
  if (site) counts.site = site;
  const individual = find("individual");
  const stage = find("stage");
  const fate = find("fate");
  const offspring = find("offspring");
  if (individual) fates.individual = individual;
  if (time) fates.year = time;
  if (stage) fates.stage = stage;
  if (fate) fates.fate = fate;
  if (offspring) fates.offspring = offspring;
  if (site) fates.site = site;
  return { counts, "stage-fates": fates };
}

export type CheckedUpload =
  | { kind: "counts"; report: ValidationReport; columns: CountsColumns | null }
  | { kind: "stage-fates"; report: ValidationReport; columns: FateColumns | null };

const LABELS: Record<string, string> = { time: "year", count: "count", site: "site", individual: "individual", year: "year", stage: "stage", fate: "fate", offspring: "offspring" };

/** Reads the whole file through the checker of its kind; columns only when nothing is wrong. */
export async function checkUpload(buffer: Buffer, request: UploadRequest): Promise<CheckedUpload> {
  const report = (problems: RecordProblem[], rows: number, delimiter: string, decimalComma: boolean): ValidationReport => ({
    ok: problems.length === 0,
    rows,
    problems: problems.slice(0, MAX_REPORTED_PROBLEMS),
    problemCount: problems.length,
    delimiter,
    decimalComma,
  });
  const decoded = decodeFile(buffer, request.options);
  if ("problem" in decoded) return { kind: request.kind, report: report([decoded.problem], 0, request.options.delimiter, false), columns: null } as CheckedUpload;
  const { text, delimiter, decimalComma } = decoded.file;

  let header: string[] | null = null;
  let rows = 0;
  const early: RecordProblem[] = [];
  let counts: CountsChecker | null = null;
  let fates: FatesChecker | null = null;
  try {
    for await (const r of records(text, delimiter)) {
      if (!header) {
        header = r.values.map((v) => v.trim());
        const wrong = wrongDelimiterProblem(header, delimiter);
        if (wrong) {
          early.push(wrong);
          break;
        }
        if (request.kind === "counts") {
          const m = request.mapping;
          const wanted: Record<string, string | undefined> = { time: m.time, count: m.count, site: m.site };
          (m.stages ?? []).forEach((s, k) => (wanted[`stage:${k}`] = s.column));
          const labels = { ...LABELS, ...Object.fromEntries((m.stages ?? []).map((s, k) => [`stage:${k}`, `${s.stage} count`])) };
          const { index, problems } = resolveColumns(header, wanted, labels);
          if (problems.length) {
            early.push(...problems);
            break;
          }
          counts = new CountsChecker(header, { time: index.time!, count: index.count!, site: index.site, stages: (m.stages ?? []).map((s, k) => ({ stage: s.stage, index: index[`stage:${k}`]! })) }, decimalComma);
        } else {
          const m = request.mapping;
          const { index, problems } = resolveColumns(header, { ...m }, LABELS);
          if (problems.length) {
            early.push(...problems);
            break;
          }
          fates = new FatesChecker(header, { individual: index.individual!, year: index.year!, stage: index.stage!, fate: index.fate!, offspring: index.offspring, site: index.site }, decimalComma, {
            deadValue: request.options.deadValue,
            stages: request.options.stages,
          });
        }
        continue;
      }
      rows++;
      if (rows > MAX_UPLOAD_ROWS) {
        early.push({ line: r.line, column: null, problem: `The file has more than ${MAX_UPLOAD_ROWS.toLocaleString("en")} rows, the most one upload may hold. Split it by site or by period.` });
        break;
      }
      counts?.row(r.values, r.line);
      fates?.row(r.values, r.line);
    }
  } catch (err) {
    const p = parserProblem(err);
    if (!p) throw err;
    early.push(p);
  }
  if (!header && early.length === 0) early.push({ line: 1, column: null, problem: "The file is empty." });
  else if (rows === 0 && early.length === 0) early.push({ line: 2, column: null, problem: "The file has a header but no rows of data." });

  if (request.kind === "counts") {
    const problems = [...early, ...(counts?.problems ?? [])].sort((a, b) => a.line - b.line);
    return { kind: "counts", report: report(problems, rows, delimiter, decimalComma), columns: problems.length === 0 && counts ? counts.out : null };
  }
  const cols = fates && early.length === 0 ? fates.finish() : null;
  const problems = [...early, ...(fates?.problems ?? [])].sort((a, b) => a.line - b.line);
  return { kind: "stage-fates", report: report(problems, rows, delimiter, decimalComma), columns: problems.length === 0 ? cols : null };
}
