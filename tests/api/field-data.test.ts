import { count, eq } from "drizzle-orm";
import { afterAll, afterEach, beforeAll, describe, expect, it } from "vitest";
import { auditEvents, countRows, datasets, fateRows, memberships, runs } from "../../server/db/schema";
import { COUNTS_CSV, countsFields, FATES_CSV, fatesFields, uploadCsv } from "../helpers/field-data";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

let server: TestServer;
const workers: ReturnType<typeof startWorker>[] = [];
beforeAll(async () => {
  server = await startTestServer();
});
afterEach(async () => {
  await Promise.all(workers.splice(0).map((w) => w.stop()));
});
afterAll(async () => {
  await server?.close();
});

async function setup() {
  const owner = await signUpAgent(server);
  const studyId = (await owner.post("/api/v1/studies", { name: "Field" })).body.id as string;
  return { owner, studyId };
}

async function stored(studyId: string) {
  const [d] = await server.db.select({ n: count() }).from(datasets).where(eq(datasets.studyId, studyId));
  const [c] = await server.db.select({ n: count() }).from(countRows);
  const [f] = await server.db.select({ n: count() }).from(fateRows);
  return { datasets: d!.n, countRows: c!.n, fateRows: f!.n };
}

describe("uploading census counts", () => {
  it("previews, checks, stores the file and rows in one go, and lists, renames and deletes", async () => {
    const { owner, studyId } = await setup();
    const preview = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/preview`, { content: `\uFEFF${COUNTS_CSV.replaceAll(",", ";")}` });
    expect(preview.status).toBe(200);
    expect(preview.body).toMatchObject({ delimiter: ";", decimalComma: false, header: ["year", "count", "site"] });
    expect(preview.body.rows[0]).toEqual(["2010", "120", "North"]);
    expect(preview.body.suggested.counts).toEqual({ time: "year", count: "count", site: "site" });

    const check = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/check`, { content: COUNTS_CSV }, countsFields());
    expect(check.status).toBe(200);
    expect(check.body).toMatchObject({ ok: true, rows: 9, problems: [] });
    expect((await stored(studyId)).datasets).toBe(0);

    const created = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: COUNTS_CSV, name: "newts.csv" }, countsFields("Yearly counts"));
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ name: "Yearly counts", kind: "counts", fileName: "newts.csv", rowCount: 9, sites: ["North", "South"], firstYear: 2010, lastYear: 2014 });
    const id = created.body.id as string;
    const [row] = await server.db.select().from(datasets).where(eq(datasets.id, id));
    expect(row!.fileContent.toString("utf8")).toBe(COUNTS_CSV);
    expect(row!.uploadedBy).toBe(owner.user.id);
    expect((await stored(studyId)).countRows).toBe(9);
    const file = await owner.get(`/api/v1/datasets/${id}/file`);
    expect(file.status).toBe(200);
    expect(file.text).toBe(COUNTS_CSV);

    expect((await owner.get(`/api/v1/studies/${studyId}/datasets`)).body.map((d: { id: string }) => d.id)).toEqual([id]);
    expect((await owner.patch(`/api/v1/datasets/${id}`, { name: "Renamed" })).body.name).toBe("Renamed");
    expect((await owner.patch(`/api/v1/datasets/${id}`, { name: "  " })).status).toBe(400);
    expect((await owner.delete(`/api/v1/datasets/${id}`)).status).toBe(204);
    expect(await stored(studyId)).toMatchObject({ datasets: 0 });
    const [rowsLeft] = await server.db.select({ n: count() }).from(countRows).where(eq(countRows.datasetId, id));
    expect(rowsLeft!.n).toBe(0);
    const actions = (await server.db.select().from(auditEvents).where(eq(auditEvents.studyId, studyId))).map((e) => e.action);
    expect(actions).toEqual(expect.arrayContaining(["dataset.uploaded", "dataset.renamed", "dataset.deleted"]));
  });

  it("reads decimal commas and dates, and analyses each site with the diffusion approximation", async () => {
    const { owner, studyId } = await setup();
    const csv = ["Date;Index;Site", "2010-05-01;12,5;A", "2011-05-03;14,0;A", "2012-05-02;11,5;A", "2014-05-01;15,5;A"].join("\r\n");
    const created = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: csv }, { kind: "counts", name: "Index", mapping: { time: "Date", count: "Index", site: "Site" } });
    expect(created.status).toBe(201);
    const a = await owner.get(`/api/v1/datasets/${created.body.id}/counts-analysis?threshold=5&maxHorizon=20`);
    expect(a.status).toBe(200);
    const site = a.body.sites[0];
    expect(site.site).toBe("A");
    expect(site.points.map((p: { count: number }) => p.count)).toEqual([12.5, 14, 11.5, 15.5]);
    // μ̂ = ln(N_q/N_0)/(t_q − t_0) with dates as fractions of a year.
    const t0 = 2010 + 120 / 365;
    const tq = 2014 + 120 / 365;
    expect(site.analysis.mu).toBeCloseTo(Math.log(15.5 / 12.5) / (tq - t0), 10);
    expect(site.analysis.quasiExtinction.horizons).toHaveLength(20);
    expect(site.analysis.notes.map((n: { code: string }) => n.code)).toContain("missing-years");
    expect((await owner.get(`/api/v1/datasets/${created.body.id}/counts-analysis?threshold=-1`)).body.error.fields[0].path).toBe("threshold");
    expect((await owner.get(`/api/v1/datasets/${created.body.id}/fate-analysis`)).status).toBe(400);
  });
});

describe("bad uploads: a report naming line and column, and nothing stored", () => {
  const cases: { name: string; csv: string | Buffer; fields?: object; status?: number; expect: RegExp; line?: number; column?: string | null }[] = [
    { name: "wrong delimiter", csv: COUNTS_CSV.replaceAll(",", ";"), fields: { ...countsFields(), options: { delimiter: "," } }, expect: /separated by a semicolon/, line: 1, column: null },
    { name: "missing required column", csv: COUNTS_CSV.replace("count", "total"), expect: /count column “count” is not in the header/, line: 1, column: "count" },
    { name: "duplicated required column", csv: COUNTS_CSV.replace("site", "count"), fields: { kind: "counts", name: "x", mapping: { time: "year", count: "count" } }, expect: /2 columns named “count”/, line: 1 },
    { name: "text in a numeric column", csv: COUNTS_CSV.replace("2012,118", "2012,about 120"), expect: /“about 120” is not a number/, line: 4, column: "count" },
    { name: "negative count", csv: COUNTS_CSV.replace("2013,140", "2013,-140"), expect: /cannot be negative/, line: 5, column: "count" },
    { name: "years out of order", csv: COUNTS_CSV.replace("2013,140,North", "2009,140,North"), expect: /2009 comes after 2012/, line: 5, column: "year" },
    { name: "repeated year", csv: COUNTS_CSV.replace("2013,41,South", "2011,41,South"), expect: /2011 is repeated at South/, line: 9, column: "year" },
    { name: "empty file", csv: "", expect: /The file is empty/, line: 1 },
    { name: "binary file", csv: Buffer.from([0x50, 0x4b, 0x03, 0x04, 0x14, 0x00, 0x06, 0x00, 0x08, 0x00, 0x00, 0x00, 0x21, 0x00]), expect: /not a text file/, line: 1 },
    { name: "header only", csv: "year,count,site\n", expect: /no rows of data/, line: 2 },
    { name: "unclosed quote", csv: `${COUNTS_CSV}\n"2015,160,North`, expect: /never closed/ },
    // Found by the fuzzer: csv-parse's error for a quote inside an unquoted value has no CSV_ prefix and was a 500.
    { name: "a quote inside an unquoted value", csv: COUNTS_CSV.replace("2012,118,North", '2012,118,No"rth'), expect: /double quote appears inside a value/, line: 4 },
    // Found by the fuzzer: a NUL byte past the first 8 kB reached the database.
    { name: "a NUL byte deep in the file", csv: Buffer.concat([Buffer.from(`${COUNTS_CSV}\n${Array.from({ length: 600 }, (_, k) => `${2015 + k},10,East Fen Meadow Reserve`).join("\n")}\n`), Buffer.from([0]), Buffer.from("\n")]), expect: /NUL character/, line: 611 },
    { name: "individual twice in one year", csv: FATES_CSV.replace("j2,2020", "j1,2020"), fields: fatesFields(), expect: /“j1” appears twice in 2020/, line: 3, column: "id" },
    { name: "fate naming an unknown stage", csv: FATES_CSV.replace("j4,2020,J,J", "j4,2020,J,Subadult"), fields: fatesFields(), expect: /fate “Subadult” is neither a stage/, line: 5, column: "fate" },
    { name: "stage not in the stage list", csv: FATES_CSV.replace("a1,2020,A", "a1,2020,Adult"), fields: fatesFields(), expect: /“Adult” is not one of the stages/, line: 12, column: "stage" },
    { name: "fate of an unknown stage without a stage list", csv: FATES_CSV.replace("j4,2020,J,J", "j4,2020,J,X"), fields: { ...fatesFields(), options: {} }, expect: /fate “X” is neither a stage seen/, line: 5, column: "fate" },
    { name: "negative offspring", csv: FATES_CSV.replace("a2,2020,A,A,3", "a2,2020,A,A,-3"), fields: fatesFields(), expect: /offspring cannot be negative/, line: 13, column: "offspring" },
  ];
  for (const c of cases) {
    it(c.name, async () => {
      const { owner, studyId } = await setup();
      const before = await stored(studyId);
      const res = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: c.csv }, (c.fields ?? countsFields()) as Record<string, object>);
      expect(res.status).toBe(c.status ?? 400);
      expect(res.body.error.code).toBe("invalid_file");
      expect(res.body.error.message).toMatch(/nothing was stored/);
      const first = res.body.report.problems[0];
      expect(first.problem).toMatch(c.expect);
      if (c.line !== undefined) expect(first.line).toBe(c.line);
      if (c.column !== undefined) expect(first.column).toBe(c.column);
      expect(await stored(studyId)).toEqual(before);
      // The check route gives the same report with 200 and stores nothing either.
      const check = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/check`, { content: c.csv }, (c.fields ?? countsFields()) as Record<string, object>);
      expect(check.status).toBe(200);
      expect(check.body.ok).toBe(false);
      expect(check.body.problems[0]).toEqual(first);
    });
  }

  it("a file over 20 MB is refused with 413 before it is read", async () => {
    const { owner, studyId } = await setup();
    const big = Buffer.alloc(20 * 1024 * 1024 + 1, "1");
    const res = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: big }, countsFields());
    expect(res.status).toBe(413);
    expect(res.body.error.message).toMatch(/larger than 20 MB/);
    expect((await stored(studyId)).datasets).toBe(0);
  });

  it("more than 500,000 rows is refused", async () => {
    const { owner, studyId } = await setup();
    const lines = ["id,year,stage,fate"];
    for (let k = 0; k < 500_001; k++) lines.push(`i${k},2020,J,dead`);
    const res = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: lines.join("\n") }, { kind: "stage-fates", name: "big", mapping: { individual: "id", year: "year", stage: "stage", fate: "fate" } });
    expect(res.status).toBe(400);
    expect(res.body.report.problems.at(-1).problem).toMatch(/more than 500,000 rows/);
    expect((await stored(studyId)).datasets).toBe(0);
  }, 120_000);

  it("reports every problem of a file, up to the listed maximum, with the total", async () => {
    const { owner, studyId } = await setup();
    const lines = ["year,count"];
    for (let k = 0; k < 300; k++) lines.push(`${2000 + k},x`);
    const res = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/check`, { content: lines.join("\n") }, { kind: "counts", name: "x", mapping: { time: "year", count: "count" } });
    expect(res.body.problemCount).toBe(300);
    expect(res.body.problems).toHaveLength(200);
  });

  it("a quote inside an unquoted value is a problem of the file in the preview too, not a 500", async () => {
    const { owner, studyId } = await setup();
    const res = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/preview`, { content: FATES_CSV.replaceAll(",", "|").replace("j5|2020", 'j5"|2020') }, { options: { delimiter: "|" } });
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe("invalid_file");
    expect(res.body.error.fields).toEqual([{ path: "file", message: expect.stringMatching(/double quote appears inside a value/) }]);
  });

  it("text the database cannot store in a form field is a 400 naming it; a file name holding it is kept, made storable", async () => {
    const { owner, studyId } = await setup();
    const nulName = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: COUNTS_CSV }, { ...countsFields(), name: "a\u0000b" });
    expect(nulName.status).toBe(400);
    expect(nulName.body.error.fields[0].path).toBe("name");
    // Inside the JSON text the NUL is only an escape; it appears once the field is parsed.
    const nulColumn = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/check`, { content: COUNTS_CSV }, { ...countsFields(), mapping: '{"time":"year\\u0000","count":"count"}' });
    expect(nulColumn.status).toBe(400);
    expect(nulColumn.body.error.fields[0].path).toBe("mapping.time");
    const surrogate = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets/preview`, { content: COUNTS_CSV }, { options: '{"delimiter":"\\ud800"}' });
    expect(surrogate.status).toBe(400);
    expect(surrogate.body.error.fields[0].path).toBe("options.delimiter");
    expect((await stored(studyId)).datasets).toBe(0);
    // A raw NUL in a part header is a malformed form; percent-encoded in the RFC 5987 form of the name it reaches the server.
    const raw = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: COUNTS_CSV, name: "counts\u0000 2024.csv" }, countsFields());
    expect(raw.status).toBe(400);
    expect(raw.body.error.fields[0].path).toBe("file");
    const boundary = "----stagewright-test";
    const part = (headers: string, body: string) => `--${boundary}\r\n${headers}\r\n\r\n${body}\r\n`;
    const fields = countsFields();
    const body =
      part('Content-Disposition: form-data; name="kind"', fields.kind) +
      part('Content-Disposition: form-data; name="name"', fields.name) +
      part('Content-Disposition: form-data; name="mapping"', JSON.stringify(fields.mapping)) +
      part(`Content-Disposition: form-data; name="file"; filename*=UTF-8''counts%00%20${encodeURIComponent("λ")}.csv\r\nContent-Type: text/csv`, COUNTS_CSV) +
      `--${boundary}--\r\n`;
    const named = await owner.agent.post(`/api/v1/studies/${studyId}/datasets`).set("X-CSRF-Token", owner.csrf).set("Content-Type", `multipart/form-data; boundary=${boundary}`).send(body);
    expect(named.status, JSON.stringify(named.body)).toBe(201);
    expect(named.body.fileName).toBe("counts\uFFFD λ.csv");
  });

  it("names a bad form field", async () => {
    const { owner, studyId } = await setup();
    const res = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: COUNTS_CSV }, { kind: "counts", name: "x", mapping: "{not json" });
    expect(res.status).toBe(400);
    expect(res.body.error.fields[0].path).toBe("mapping");
    const noFile = await owner.agent.post(`/api/v1/studies/${studyId}/datasets`).set("X-CSRF-Token", owner.csrf).field("kind", "counts");
    expect(noFile.status).toBe(400);
  });
});

describe("stage fates", () => {
  it("estimates the matrix with sample sizes and intervals, and starts a life cycle carrying them", async () => {
    const { owner, studyId } = await setup();
    const created = await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: FATES_CSV }, fatesFields("Marked"));
    expect(created.status).toBe(201);
    expect(created.body.stages).toEqual(["J", "A"]);
    const id = created.body.id as string;
    const a = await owner.get(`/api/v1/datasets/${id}/fate-analysis?census=pre-breeding&method=clopper-pearson`);
    expect(a.status).toBe(200);
    const e = a.body.pooled.estimate;
    expect(e.n).toEqual([10, 5]);
    expect(e.A).toEqual([
      [0.4, 2],
      [0.3, 0.8],
    ]);
    expect(e.lambda).toBeCloseTo(1.4, 10);
    expect(e.transitions.find((t: { from: number; to: number }) => t.from === 1 && t.to === 0).zeroCount).toBe(true);
    expect((await owner.get(`/api/v1/datasets/${id}/fate-analysis?census=sometimes`)).body.error.fields[0].path).toBe("census");

    const lc = await owner.post(`/api/v1/datasets/${id}/life-cycles`, { name: "From marks", settings: { census: "pre-breeding" } });
    expect(lc.status).toBe(201);
    const doc = lc.body.document;
    const rate = doc.rates.find((r: { name: string }) => r.name === "p_a_j");
    expect(rate).toMatchObject({ value: 0.3, counts: { k: 3, n: 10 }, datasetId: id });
    expect(rate.se).toBeCloseTo(Math.sqrt(0.3 * 0.7 / 10), 9);
    expect(rate.source).toContain("Marked");
    expect(doc.rates.find((r: { name: string }) => r.name === "m_a")).toMatchObject({ value: 2, datasetId: id });
    const analysis = await owner.get(`/api/v1/life-cycles/${lc.body.id}/analysis`);
    expect(analysis.body.lambda).toBeCloseTo(1.4, 8);
  });

  it("viewers read the analyses but cannot upload; the bootstrap Run computes in a worker with progress", async () => {
    const { owner, studyId } = await setup();
    const viewer = await signUpAgent(server);
    await server.db.insert(memberships).values({ studyId, userId: viewer.user.id, role: "viewer" });
    const id = (await uploadCsv(owner, `/api/v1/studies/${studyId}/datasets`, { content: FATES_CSV }, fatesFields())).body.id as string;
    expect((await viewer.get(`/api/v1/datasets/${id}/fate-analysis`)).status).toBe(200);
    expect((await uploadCsv(viewer, `/api/v1/studies/${studyId}/datasets`, { content: FATES_CSV }, fatesFields())).status).toBe(403);

    expect((await owner.post(`/api/v1/datasets/${id}/runs`, { kind: "bootstrap", settings: { resamples: 100 } })).body.error.fields[0].path).toBe("settings.resamples");
    const start = await owner.post(`/api/v1/datasets/${id}/runs`, { kind: "bootstrap", settings: { resamples: 2000, seed: 5 } });
    expect(start.status).toBe(201);
    expect(start.body).toMatchObject({ datasetId: id, lifeCycleId: null, chunksTotal: 8 });
    workers.push(startWorker(server.databaseUrl));
    let run = start.body;
    const until = Date.now() + 120_000;
    while (run.status !== "succeeded" && run.status !== "failed" && Date.now() < until) {
      await new Promise((r) => setTimeout(r, 300));
      run = (await viewer.get(`/api/v1/runs/${start.body.id}`)).body;
    }
    expect(run.status).toBe("succeeded");
    expect(run.result.resamples).toBe(2000);
    expect(run.result.lambda).toBeCloseTo(1.4, 10);
    expect(run.result.lower).toBeLessThan(1.4);
    expect(run.result.upper).toBeGreaterThan(1.4);
    expect((await viewer.get(`/api/v1/datasets/${id}/runs`)).body.map((r: { id: string }) => r.id)).toEqual([start.body.id]);
  });
});

describe("demo Field data", () => {
  it("adds both datasets through the upload path once, with a queued bootstrap Run", async () => {
    const { seedDemo } = await import("../../server/seed");
    const { seedFieldData, DEMO_COUNTS_NAME, DEMO_FATES_NAME } = await import("../../server/seed/field-data");
    const { createJobSender } = await import("../../server/runs/queue");
    const { studyId } = await seedDemo(server.db);
    const jobs = createJobSender(server.databaseUrl);
    try {
      expect(await seedFieldData(server.db, jobs, studyId)).toBe(true);
      expect(await seedFieldData(server.db, jobs, studyId)).toBe(false);
    } finally {
      await jobs.stop();
    }
    const list = await server.db.select().from(datasets).where(eq(datasets.studyId, studyId));
    const counts = list.find((d) => d.name === DEMO_COUNTS_NAME)!;
    const fates = list.find((d) => d.name === DEMO_FATES_NAME)!;
    expect(counts.sites).toEqual(["Brannock Fen", "Kessel Marsh"]);
    expect([counts.firstYear, counts.lastYear]).toEqual([2012, 2026]);
    expect(fates.stages).toEqual(["Eft", "Subadult", "Adult"]);
    const individuals = await server.db.selectDistinct({ id: fateRows.individual }).from(fateRows).where(eq(fateRows.datasetId, fates.id));
    expect(individuals.length).toBe(212 + 143);
    const runRows = await server.db.select().from(runs).where(eq(runs.datasetId, fates.id));
    expect(runRows.map((r) => r.kind)).toEqual(["bootstrap"]);
  });
});
