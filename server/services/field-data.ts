import { and, asc, desc, eq, sql } from "drizzle-orm";
import {
  analyzeCounts,
  estimateStageFates,
  lifeCycleFromEstimate,
  type CountsColumns,
  type FateColumns,
  type FateSample,
} from "../../shared/fielddata";
import { LifeCycleSchema } from "../../shared/lifecycle";
import type { LifeCycleRecord } from "../../shared/schemas/life-cycles";
import {
  UploadSchema,
  type CountsAnalysisQuery,
  type CountsAnalysisResult,
  type DatasetKind,
  type DatasetRename,
  type DatasetSummary,
  type FateAnalysisResult,
  type FateAnalysisSettings,
  type FateGroup,
  type ParseOptions,
  type StartLifeCycle,
  type UploadPreview,
  type SiteSeries,
  type UploadRequest,
  type ValidationReport,
} from "../../shared/schemas/field-data";
import { PreviewSchema, StartLifeCycleSchema } from "../../shared/schemas/field-data";
import type { Db, DbOrTx } from "../db/client";
import { countRows, datasets, fateRows, users } from "../db/schema";
import { checkUpload, previewFile } from "../field-data/parse-upload";
import { badRequest, HttpError, notFound } from "../http/errors";
import { storableVersion, unstorableTextError } from "../http/storable-text";
import { recordEvent } from "./audit";
import { insertLifeCycle } from "./life-cycles";

/** Rows per INSERT … SELECT FROM json_to_recordset: one parameter per batch, far below PostgreSQL's 65,535. */
const INSERT_BATCH = 20_000;

export interface UploadedFile {
  originalname: string;
  buffer: Buffer;
}

export async function studyOfDataset(db: Db, datasetId: string): Promise<string | null> {
  const [r] = await db.select({ studyId: datasets.studyId }).from(datasets).where(eq(datasets.id, datasetId));
  return r?.studyId ?? null;
}

const summaryColumns = {
  id: datasets.id,
  studyId: datasets.studyId,
  name: datasets.name,
  kind: datasets.kind,
  fileName: datasets.fileName,
  fileBytes: datasets.fileBytes,
  rowCount: datasets.rowCount,
  sites: datasets.sites,
  stages: datasets.stages,
  firstYear: datasets.firstYear,
  lastYear: datasets.lastYear,
  uploadedBy: users.name,
  uploadedAt: datasets.uploadedAt,
  mapping: datasets.mapping,
};
type SummaryRow = { [K in keyof typeof summaryColumns]: unknown } & { uploadedAt: Date };
const toSummary = (r: SummaryRow): DatasetSummary => ({ ...(r as unknown as DatasetSummary), uploadedAt: r.uploadedAt.toISOString() });

export async function listDatasets(db: Db, studyId: string): Promise<DatasetSummary[]> {
  const rows = await db.select(summaryColumns).from(datasets).leftJoin(users, eq(users.id, datasets.uploadedBy)).where(eq(datasets.studyId, studyId)).orderBy(desc(datasets.uploadedAt));
  return rows.map(toSummary);
}

export async function getDataset(db: DbOrTx, id: string): Promise<DatasetSummary> {
  const [row] = await db.select(summaryColumns).from(datasets).leftJoin(users, eq(users.id, datasets.uploadedBy)).where(eq(datasets.id, id));
  if (!row) throw notFound("No such dataset.");
  return toSummary(row);
}

export async function datasetFile(db: Db, id: string): Promise<{ fileName: string; content: Buffer }> {
  const [row] = await db.select({ fileName: datasets.fileName, content: datasets.fileContent }).from(datasets).where(eq(datasets.id, id));
  if (!row) throw notFound("No such dataset.");
  return row;
}

function jsonField(fields: Record<string, unknown>, key: string): unknown {
  const raw = fields[key];
  if (raw === undefined || raw === "") return undefined;
  if (typeof raw !== "string") throw badRequest(`${key}: send it as JSON text.`, [{ path: key, message: "Send it as JSON text." }]);
  let parsed: unknown;
  try {
    parsed = JSON.parse(raw);
  } catch {
    throw badRequest(`${key}: this is not valid JSON.`, [{ path: key, message: "Not valid JSON." }]);
  }
  // "\u0000" inside the JSON text becomes a NUL only now, after the form's own check.
  const unstorable = unstorableTextError(parsed, [key]);
  if (unstorable) throw unstorable;
  return parsed;
}

export function previewOptions(fields: Record<string, unknown>): ParseOptions {
  return PreviewSchema.parse({ options: jsonField(fields, "options") }).options;
}

/** The multipart text fields as one upload request: JSON fields parsed, a bad one named. */
export function uploadRequest(fields: Record<string, unknown>): UploadRequest {
  const json = (key: string) => jsonField(fields, key);
  return UploadSchema.parse({ kind: fields.kind, name: fields.name, mapping: json("mapping"), options: json("options") });
}

function needFile(file: UploadedFile | undefined): UploadedFile {
  if (!file) throw badRequest("file: choose a CSV file to upload.", [{ path: "file", message: "Choose a CSV file to upload." }]);
  return file;
}

export async function previewUpload(file: UploadedFile | undefined, options: ParseOptions): Promise<UploadPreview> {
  const result = await previewFile(needFile(file).buffer, options);
  if ("problem" in result) throw new HttpError(400, result.problem, "invalid_file", [{ path: "file", message: result.problem }]);
  return result;
}

/** The validation report of a file, without storing anything. */
export async function checkDatasetFile(file: UploadedFile | undefined, request: UploadRequest): Promise<ValidationReport> {
  return (await checkUpload(needFile(file).buffer, request)).report;
}

function refuse(report: ValidationReport): HttpError {
  const first = report.problems[0]!;
  const n = report.problemCount;
  return new HttpError(
    400,
    `The file has ${n.toLocaleString("en")} problem${n === 1 ? "" : "s"}, so nothing was stored. Line ${first.line}${first.column ? `, column “${first.column}”` : ""}: ${first.problem}`,
    "invalid_file",
    [{ path: "file", message: first.problem }],
    { report },
  );
}

const distinct = (xs: string[]) => [...new Set(xs)].filter((x) => x !== "").sort();

/** Checks the whole file and stores it with its rows in one transaction; a file with any problem stores nothing. */
export async function createDataset(db: Db, studyId: string, userId: string, file: UploadedFile | undefined, request: UploadRequest): Promise<DatasetSummary> {
  const f = needFile(file);
  const checked = await checkUpload(f.buffer, request);
  if (!checked.report.ok || !checked.columns) throw refuse(checked.report);
  const report = checked.report;
  // The name comes from the sender's disk, not from a form the person filled in: keep it, made storable.
  const fileName = storableVersion((f.originalname || "upload.csv").slice(0, 255));

  return db.transaction(async (tx) => {
    let stages: string[];
    let sites: string[];
    let years: number[];
    if (checked.kind === "counts") {
      const c = checked.columns as CountsColumns;
      stages = (request.kind === "counts" ? (request.mapping.stages ?? []) : []).map((s) => s.stage);
      sites = distinct(c.site);
      years = c.time;
    } else {
      const c = checked.columns as FateColumns;
      stages = c.stages;
      sites = distinct(c.site);
      years = c.year;
    }
    let first = Infinity;
    let last = -Infinity;
    for (const y of years) {
      if (y < first) first = y;
      if (y > last) last = y;
    }
    const [row] = await tx
      .insert(datasets)
      .values({
        studyId,
        name: request.name,
        kind: request.kind,
        fileName,
        fileBytes: f.buffer.length,
        fileContent: f.buffer,
        rowCount: report.rows,
        mapping: request.mapping,
        options: { ...request.options, delimiter: report.delimiter, decimalComma: report.decimalComma },
        stages,
        sites,
        firstYear: Number.isFinite(first) ? first : null,
        lastYear: Number.isFinite(last) ? last : null,
        uploadedBy: userId,
      })
      .returning({ id: datasets.id });
    const id = row!.id;
    if (checked.kind === "counts") await insertCountRows(tx, id, checked.columns as CountsColumns, stages);
    else await insertFateRows(tx, id, checked.columns as FateColumns);
    await recordEvent(tx, {
      studyId,
      actorId: userId,
      action: "dataset.uploaded",
      summary: `uploaded the ${request.kind === "counts" ? "census counts" : "stage fates"} “${request.name}” (${report.rows.toLocaleString("en")} rows from ${fileName})`,
      details: { datasetId: id, rows: report.rows, bytes: f.buffer.length },
    });
    return getDataset(tx, id);
  });
}

async function insertCountRows(tx: DbOrTx, id: string, c: CountsColumns, stages: string[]): Promise<void> {
  for (let start = 0; start < c.time.length; start += INSERT_BATCH) {
    const batch = [];
    for (let r = start; r < Math.min(c.time.length, start + INSERT_BATCH); r++) {
      const sc = stages.length ? Object.fromEntries(stages.map((s, k) => [s, Number.isNaN(c.stageCounts[k]![r]!) ? null : c.stageCounts[k]![r]!])) : null;
      batch.push({ line: c.line[r], site: c.site[r], time: c.time[r], label: c.label[r], count: c.count[r], stage_counts: sc });
    }
    await tx.execute(sql`
      insert into ${countRows} (dataset_id, line, site, time, label, count, stage_counts)
      select ${id}::uuid, r.line, r.site, r.time, r.label, r.count, r.stage_counts
      from json_to_recordset(${JSON.stringify(batch)}::json) as r(line int, site text, time double precision, label text, count double precision, stage_counts jsonb)`);
  }
}

async function insertFateRows(tx: DbOrTx, id: string, c: FateColumns): Promise<void> {
  const m = c.individual.length;
  for (let start = 0; start < m; start += INSERT_BATCH) {
    const batch = [];
    for (let r = start; r < Math.min(m, start + INSERT_BATCH); r++) {
      const o = c.offspring[r]!;
      batch.push({ line: c.line[r], site: c.site[r], individual: c.individual[r], year: c.year[r], stage: c.stage[r], fate: c.fate[r], offspring: Number.isNaN(o) ? null : o });
    }
    await tx.execute(sql`
      insert into ${fateRows} (dataset_id, line, site, individual, year, stage, fate, offspring)
      select ${id}::uuid, r.line, r.site, r.individual, r.year, r.stage, r.fate, r.offspring
      from json_to_recordset(${JSON.stringify(batch)}::json) as r(line int, site text, individual text, year double precision, stage smallint, fate smallint, offspring double precision)`);
  }
}

export async function renameDataset(db: Db, id: string, userId: string, input: DatasetRename): Promise<DatasetSummary> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select({ name: datasets.name, studyId: datasets.studyId }).from(datasets).where(eq(datasets.id, id)).for("update");
    if (!before) throw notFound("No such dataset.");
    if (before.name !== input.name) {
      await tx.update(datasets).set({ name: input.name }).where(eq(datasets.id, id));
      await recordEvent(tx, { studyId: before.studyId, actorId: userId, action: "dataset.renamed", summary: `renamed the dataset “${before.name}” to “${input.name}”`, details: { datasetId: id } });
    }
    return getDataset(tx, id);
  });
}

export async function deleteDataset(db: Db, id: string, userId: string): Promise<void> {
  await db.transaction(async (tx) => {
    const [gone] = await tx.delete(datasets).where(eq(datasets.id, id)).returning({ name: datasets.name, studyId: datasets.studyId, rows: datasets.rowCount });
    if (!gone) throw notFound("No such dataset.");
    await recordEvent(tx, { studyId: gone.studyId, actorId: userId, action: "dataset.deleted", summary: `deleted the dataset “${gone.name}” (${gone.rows.toLocaleString("en")} rows)`, details: { datasetId: id } });
  });
}

async function datasetOfKind(db: DbOrTx, id: string, kind: DatasetKind) {
  const [d] = await db.select().from(datasets).where(eq(datasets.id, id));
  if (!d) throw notFound("No such dataset.");
  if (d.kind !== kind) throw badRequest(`This dataset holds ${d.kind === "counts" ? "census counts" : "stage fates"}; this analysis needs ${kind === "counts" ? "census counts" : "stage fates"}.`);
  return d;
}

// ------------------------------------------------------------------ counts

export async function countsAnalysis(db: Db, id: string, query: CountsAnalysisQuery): Promise<CountsAnalysisResult> {
  const d = await datasetOfKind(db, id, "counts");
  const rows = await db.select().from(countRows).where(eq(countRows.datasetId, id)).orderBy(asc(countRows.site), asc(countRows.time));
  const bySite = new Map<string, typeof rows>();
  for (const r of rows) {
    if (query.site !== undefined && r.site !== query.site) continue;
    const list = bySite.get(r.site) ?? [];
    list.push(r);
    bySite.set(r.site, list);
  }
  if (query.site !== undefined && bySite.size === 0) throw badRequest(`site: the dataset has no site “${query.site}”.`, [{ path: "site", message: "No such site in this dataset." }]);
  const sites: SiteSeries[] = [];
  for (const [site, list] of bySite) {
    sites.push({
      site,
      points: list.map((r) => ({ t: r.time, label: r.label, count: r.count, stageCounts: r.stageCounts ?? null })),
      analysis: analyzeCounts(
        list.map((r) => ({ t: r.time, n: r.count })),
        { threshold: query.threshold, maxHorizon: query.maxHorizon },
      ),
    });
  }
  return { datasetId: id, stages: d.stages, threshold: query.threshold ?? null, sites };
}

// -------------------------------------------------------------- stage fates

/** The stage-fate records of a dataset as columns, optionally one site and/or one year only. */
export async function loadFateSample(db: DbOrTx, id: string, filter: { site?: string; year?: number } = {}): Promise<{ sample: FateSample; site: string[]; year: Float64Array; stages: string[] }> {
  const d = await datasetOfKind(db, id, "stage-fates");
  const conditions = [eq(fateRows.datasetId, id)];
  if (filter.site !== undefined) conditions.push(eq(fateRows.site, filter.site));
  if (filter.year !== undefined) conditions.push(eq(fateRows.year, filter.year));
  const rows = await db
    .select({ site: fateRows.site, year: fateRows.year, stage: fateRows.stage, fate: fateRows.fate, offspring: fateRows.offspring })
    .from(fateRows)
    .where(and(...conditions))
    .orderBy(asc(fateRows.line));
  const m = rows.length;
  const sample: FateSample = { stages: d.stages, stage: new Int32Array(m), fate: new Int32Array(m), offspring: new Float64Array(m) };
  const year = new Float64Array(m);
  const site: string[] = new Array(m);
  rows.forEach((r, k) => {
    sample.stage[k] = r.stage;
    sample.fate[k] = r.fate;
    sample.offspring[k] = r.offspring ?? NaN;
    year[k] = r.year;
    site[k] = r.site;
  });
  return { sample, site, year, stages: d.stages };
}

function subset(sample: FateSample, keep: (k: number) => boolean): FateSample {
  const idx: number[] = [];
  for (let k = 0; k < sample.stage.length; k++) if (keep(k)) idx.push(k);
  return {
    stages: sample.stages,
    stage: Int32Array.from(idx, (k) => sample.stage[k]!),
    fate: Int32Array.from(idx, (k) => sample.fate[k]!),
    offspring: Float64Array.from(idx, (k) => sample.offspring[k]!),
  };
}

export async function fateAnalysis(db: Db, id: string, settings: FateAnalysisSettings): Promise<FateAnalysisResult> {
  const { sample, site, year, stages } = await loadFateSample(db, id, { site: settings.site, year: settings.year });
  if (sample.stage.length === 0) throw badRequest("No records match this site and year.", [{ path: settings.year !== undefined ? "year" : "site", message: "No records match." }]);
  const options = { census: settings.census, offspringSurvival: settings.offspringSurvival, method: settings.method } as const;
  const group = (label: string, s: FateSample, g: { site: string | null; year: number | null }): FateGroup => ({ label, ...g, records: s.stage.length, estimate: estimateStageFates(s, options) });
  const pooled = group(settings.site ?? "All records", sample, { site: settings.site ?? null, year: settings.year ?? null });
  const siteNames = [...new Set(site)].sort();
  const bySite = settings.site === undefined && siteNames.length > 1 ? siteNames.map((s) => group(s, subset(sample, (k) => site[k] === s), { site: s, year: null })) : [];
  const yearValues = [...new Set(year)].sort((a, b) => a - b);
  // Years whose records have no known fate (the last census, say) have no matrix to show.
  const byYear =
    settings.year === undefined && yearValues.length > 1
      ? yearValues.map((y) => group(`${y}–${y + 1}`, subset(sample, (k) => year[k] === y), { site: settings.site ?? null, year: y })).filter((g) => g.estimate.n.some((n) => n > 0))
      : [];
  return { datasetId: id, stages, settings, pooled, bySite, byYear };
}

export async function startLifeCycle(db: Db, id: string, userId: string, raw: StartLifeCycle): Promise<LifeCycleRecord> {
  const input = StartLifeCycleSchema.parse(raw);
  const d = await getDataset(db, id);
  const { sample } = await loadFateSample(db, id, { site: input.settings.site, year: input.settings.year });
  if (sample.stage.length === 0) throw badRequest("No records match this site and year.", [{ path: "settings", message: "No records match." }]);
  const estimate = estimateStageFates(sample, { census: input.settings.census, offspringSurvival: input.settings.offspringSurvival, method: input.settings.method });
  const years = input.settings.year !== undefined ? `${input.settings.year}–${input.settings.year + 1}` : d.firstYear !== null ? `${d.firstYear}–${d.lastYear}` : "";
  const scope = [years, input.settings.site ?? (d.sites.length > 1 ? "all sites" : d.sites[0])].filter(Boolean).join(", ");
  const document = LifeCycleSchema.parse(lifeCycleFromEstimate(estimate, { name: input.name, datasetId: id, datasetName: d.name, scope: `${sample.stage.length} records, ${scope}` }));
  return db.transaction(async (tx) => {
    const lc = await insertLifeCycle(tx, d.studyId, userId, document, "created");
    await recordEvent(tx, { studyId: d.studyId, actorId: userId, action: "dataset.life_cycle_started", summary: `started the life cycle “${document.name}” from the estimates of “${d.name}”`, details: { datasetId: id, lifeCycleId: lc.id } });
    return lc;
  });
}
