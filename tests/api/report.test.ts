import { unzipSync, strFromU8 } from "fflate";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { eq } from "drizzle-orm";
import { memberships } from "../../server/db/schema";
import { defaultResponse } from "../../shared/climate";
import { formatLambda } from "../../shared/format/number-format";
import { celsiusText } from "../../shared/report/text";
import { demoLikeClimateLifeCycle, warmableLifeCycle } from "../factories/climate";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { binaryParser, pdfText } from "../helpers/pdf";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

let server: TestServer;
let owner: Awaited<ReturnType<typeof signUpAgent>>;
let studyId: string;
let lifeCycleId: string;

beforeAll(async () => {
  server = await startTestServer();
  owner = await signUpAgent(server, { name: "Olwen Report" });
  studyId = (await owner.post("/api/v1/studies", { name: "Report Study" })).body.id;
  lifeCycleId = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Fen newts" }) })).body.id;
});
afterAll(async () => {
  await server?.close();
});

const getPdf = (path: string, agent = owner) => agent.agent.get(path).buffer(true).parse(binaryParser);

describe("report", () => {
  it("holds the analysis the Results tab shows, the authors and the cautions", async () => {
    const analysis = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/analysis`);
    const res = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/report`);
    expect(res.status).toBe(200);
    expect(res.body.analysis.lambda).toBe(analysis.body.lambda);
    expect(res.body.study.name).toBe("Report Study");
    expect(res.body.authors).toEqual(["Olwen Report"]);
    expect(res.body.source).toMatchObject({ kind: "current", version: 1, latestSnapshot: null });
    expect(res.body.cautions.join(" ")).toContain("do not replace expert judgement");
    expect(res.body.figures.diagram).toMatch(/^<\?xml[\s\S]*<svg[\s\S]*Juvenile/);
    expect(res.body.figures.elasticity).toMatch(/^<svg/);
    expect(res.body.verdict.headline).toMatch(/^(growing|declining|stable)/);
  });

  it("makes a valid A4 PDF whose text holds λ as the screen shows it", async () => {
    const lambda = (await owner.get(`/api/v1/life-cycles/${lifeCycleId}/analysis`)).body.lambda as number;
    const res = await getPdf(`/api/v1/life-cycles/${lifeCycleId}/report.pdf`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/pdf");
    expect(res.headers["content-disposition"]).toContain('filename="fen-newts-report.pdf"');
    const pdf = res.body as Buffer;
    expect(pdf.subarray(0, 5).toString("latin1")).toBe("%PDF-");
    expect(pdf.subarray(-6).toString("latin1")).toContain("%%EOF");
    const { text, pages } = await pdfText(pdf);
    expect(pages).toBeGreaterThanOrEqual(2);
    expect(text).toContain(`λ = ${formatLambda(lambda)}`);
    expect(text).toContain("Report Study");
    expect(text).toContain("Models are only as good as their data.");
    // A4 is 595.28 × 841.89 points.
    expect(pdf.toString("latin1")).toMatch(/\/MediaBox \[0 0 595\.28 841\.89\]/);
  });

  it("makes Letter paper on request", async () => {
    const res = await getPdf(`/api/v1/life-cycles/${lifeCycleId}/report.pdf?paper=letter`);
    expect(res.status).toBe(200);
    expect((res.body as Buffer).toString("latin1")).toMatch(/\/MediaBox \[0 0 612 792\]/);
  });

  it("reports a snapshot, and names the field when the snapshot is not this life cycle's", async () => {
    const snap = await owner.post(`/api/v1/life-cycles/${lifeCycleId}/snapshots`, { message: "for the panel" });
    const res = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/report?snapshot=${snap.body.id}`);
    expect(res.body.source).toMatchObject({ kind: "snapshot", id: snap.body.id, number: 1, message: "for the panel" });
    const pdf = await getPdf(`/api/v1/life-cycles/${lifeCycleId}/report.pdf?snapshot=${snap.body.id}`);
    expect((await pdfText(pdf.body as Buffer)).text).toContain(snap.body.id);
    const now = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/report`);
    expect(now.body.source.latestSnapshot).toMatchObject({ id: snap.body.id, sameAsNow: true });

    const bad = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/report?snapshot=00000000-0000-4000-8000-000000000000`);
    expect(bad.status).toBe(400);
    expect(bad.body.error.fields[0].path).toBe("snapshot");
    const malformed = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/report?snapshot=nope&paper=a3`);
    expect(malformed.status).toBe(400);
    expect(malformed.body.error.fields.map((f: { path: string }) => f.path).sort()).toEqual(["paper", "snapshot"]);
  });

  it("is 404 for a life cycle the caller may not read", async () => {
    const outsider = await signUpAgent(server);
    expect((await outsider.get(`/api/v1/life-cycles/${lifeCycleId}/report`)).status).toBe(404);
    expect((await getPdf(`/api/v1/life-cycles/${lifeCycleId}/report.pdf`, outsider)).status).toBe(404);
  });

  it("still reports a life cycle that cannot be analysed, saying why", async () => {
    const id = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { name: "Not drawn yet" })).body.id;
    const res = await owner.get(`/api/v1/life-cycles/${id}/report`);
    expect(res.status).toBe(200);
    expect(res.body.analysis).toBeNull();
    expect(res.body.analysisProblem).toMatch(/no stages/);
    const pdf = await getPdf(`/api/v1/life-cycles/${id}/report.pdf`);
    expect((await pdfText(pdf.body as Buffer)).text).toContain("λ cannot be computed");
  });
});

describe("report: uncertainty, levers and review", () => {
  it("gives λ's interval from the rates' SEs, the scenarios compared and the strongest levers", async () => {
    const doc = threeStageLifeCycle({ name: "With levers" });
    doc.rates = doc.rates.map((r) => (r.name === "s_a" ? { ...r, se: 0.03 } : r.name === "s_j" ? { ...r, se: 0.05 } : r));
    doc.scenarios = [
      { id: "sc_fence", name: "Fence the road", action: "Culverts under the road", cost: 40, changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_sa" }, op: "multiply", value: 1.05 }] },
      { id: "sc_head", name: "Head-start juveniles", changes: [{ id: "ch_2", target: { kind: "rate", rateId: "vr_sj" }, op: "add", value: 0.1 }] },
    ];
    const id = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc })).body.id;
    const analysis = (await owner.get(`/api/v1/life-cycles/${id}/analysis`)).body;
    const res = await owner.get(`/api/v1/life-cycles/${id}/report`);
    expect(res.status).toBe(200);
    const { levers, figures } = res.body;
    // The same interval the Results tab shows (delta method on the analysis).
    expect(res.body.analysis.uncertainty.lambda).toEqual(analysis.uncertainty.lambda);
    expect(levers.comparison.rows.map((r: { name: string }) => r.name)).toEqual(["Baseline", "Fence the road", "Head-start juveniles"]);
    // Fence: s_a × 1.05 changes λ exactly as re-analysing the changed document does.
    const fenced = threeStageLifeCycle();
    fenced.rates = fenced.rates.map((r) => (r.name === "s_a" ? { ...r, value: r.value * 1.05 } : r));
    const direct = (await owner.post("/api/v1/analyze", { document: fenced })).body.lambda;
    expect(levers.comparison.rows[1].planned.lambda).toBeCloseTo(direct, 12);
    expect(levers.comparison.rows[1].deltaLambdaPerCost).toBeCloseTo((direct - analysis.lambda) / 40, 12);
    expect(levers.topLevers.length).toBeGreaterThan(0);
    expect(levers.topLevers.length).toBeLessThanOrEqual(8);
    expect(figures.scenarios).toMatch(/^<svg/);

    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${id}/report.pdf`)).body as Buffer);
    const u = analysis.uncertainty.lambda;
    expect(text).toContain(`interval ${formatLambda(u.lower)} – ${formatLambda(u.upper)}`);
    expect(text).toContain("Fence the road");
    expect(text).toContain(formatLambda(direct));
    expect(text).toContain("Not reviewed yet.");
  });

  it("gives λ's percentile interval from the newest Monte Carlo Run, and says when the Run drew from another version", async () => {
    const doc = threeStageLifeCycle({ name: "Monte Carlo" });
    doc.rates = doc.rates.map((r) => (r.name === "s_a" ? { ...r, se: 0.03 } : r.name === "s_j" ? { ...r, se: 0.05 } : r));
    const lc = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc })).body;
    const created = await owner.post(`/api/v1/life-cycles/${lc.id}/runs`, { kind: "uncertainty", settings: { draws: 1000, seed: 3 } });
    expect(created.status).toBe(201);
    const worker = startWorker(server.databaseUrl);
    let run = created.body;
    try {
      const until = Date.now() + 120_000;
      while (run.status !== "succeeded") {
        if (run.status === "failed" || Date.now() > until) throw new Error(`uncertainty run ${run.status}: ${run.error}`);
        await new Promise((r) => setTimeout(r, 200));
        run = (await owner.get(`/api/v1/runs/${run.id}`)).body;
      }
    } finally {
      await worker.stop();
    }
    const res = await owner.get(`/api/v1/life-cycles/${lc.id}/report`);
    const l = run.result.lambda;
    expect(res.body.lambdaRun).toMatchObject({ runId: run.id, draws: 1000, level: 0.95, lower: l.lower, median: l.median, upper: l.upper, probabilityBelowOne: l.probabilityBelowOne, lifeCycleVersion: 1, sameAsReported: true });
    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${lc.id}/report.pdf`)).body as Buffer);
    const flatText = text.replace(/\s+/g, " ");
    expect(flatText).toContain(`1,000 draws from the rates' uncertainty give a 95 % percentile interval ${formatLambda(l.lower)} – ${formatLambda(l.upper)}`);
    expect(flatText).not.toContain("not the state reported here");

    // A later save: the Run's interval stays, marked as drawn from version 1.
    const saved = await owner.put(`/api/v1/life-cycles/${lc.id}`, { version: lc.version, document: { ...doc, notes: "re-checked" } });
    expect(saved.status).toBe(200);
    const later = await owner.get(`/api/v1/life-cycles/${lc.id}/report`);
    expect(later.body.lambdaRun.sameAsReported).toBe(false);
    const { text: laterText } = await pdfText((await getPdf(`/api/v1/life-cycles/${lc.id}/report.pdf`)).body as Buffer);
    expect(laterText.replace(/\s+/g, " ")).toContain("It drew from version 1 of the life cycle, not the state reported here.");
  }, 150_000);

  it("shows the review status with each approval", async () => {
    const reviewer = await signUpAgent(server, { name: "Rowan Reviewer" });
    await server.db.insert(memberships).values({ studyId, userId: reviewer.user.id, role: "reviewer" });
    const id = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Reviewed" }) })).body.id;
    const snap = (await owner.post(`/api/v1/life-cycles/${id}/snapshots`, { message: "for review" })).body;
    expect((await owner.post(`/api/v1/life-cycles/${id}/reviews`, { snapshotId: snap.id, reviewerIds: [reviewer.user.id] })).status).toBe(201);
    const decided = await reviewer.post(`/api/v1/life-cycles/${id}/reviews/decision`, { snapshotId: snap.id, decision: "approved", summary: "Rates match the 2026 survey." });
    expect(decided.status).toBe(200);
    const res = await owner.get(`/api/v1/life-cycles/${id}/report`);
    expect(res.body.review.status).toMatchObject({ state: "approved", approvals: 1, snapshotNumber: 1, changedSinceApproval: false });
    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${id}/report.pdf`)).body as Buffer);
    expect(text).toContain("Approved. Snapshot #1: 1 approval, 0 requests for changes, 0 pending.");
    expect(text).toContain("Rowan Reviewer");
    expect(text).toContain("Rates match the 2026 survey.");
    await server.db.delete(memberships).where(eq(memberships.userId, reviewer.user.id));
  });
});

describe("report: Climate", () => {
  /** PDF text with line breaks and runs of spaces made single spaces, so a wrapped sentence still matches. */
  const flat = (text: string) => text.replace(/\s+/g, " ");

  it("gives the thermal responses, the window with the Climate tab's edges, dλ/dT by rate and the warming Run, in the JSON and the PDF", async () => {
    const doc = demoLikeClimateLifeCycle();
    const id = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc })).body.id as string;
    const created = await owner.post(`/api/v1/life-cycles/${id}/runs`, { kind: "warming", settings: { trajectory: doc.climate!.trajectory!, replicates: 200, initialTotal: 400, threshold: 40, seed: 5 } });
    expect(created.status).toBe(201);
    const worker = startWorker(server.databaseUrl);
    let run = created.body;
    try {
      const until = Date.now() + 120_000;
      while (run.status !== "succeeded") {
        if (run.status === "failed" || Date.now() > until) throw new Error(`warming run ${run.status}: ${run.error}`);
        await new Promise((r) => setTimeout(r, 200));
        run = (await owner.get(`/api/v1/runs/${run.id}`)).body;
      }
    } finally {
      await worker.stop();
    }

    // What the Climate tab asks for: the saved range at 200 points, the slope at the trajectory's first year (11.5 °C).
    const tab = (await owner.post("/api/v1/climate/lambda", { document: doc, range: doc.climate!.range!, points: 200, at: 11.5 })).body;
    const res = await owner.get(`/api/v1/life-cycles/${id}/report`);
    expect(res.status).toBe(200);
    const c = res.body.climate;
    expect(c.range).toEqual({ min: 0, max: 25, saved: true });
    expect(c.responses.map((r: { rateName: string; form: string }) => `${r.rateName}:${r.form}`)).toEqual(["s_j:arrhenius", "s_e:gaussian-quadratic", "m:briere"]);
    // The typical activation energy is marked with its published source; the demo's own values carry no default mark.
    const sj = c.responses[0];
    expect(sj.parameters[0]).toMatchObject({ key: "activationEnergy", value: 0.65, unit: "eV", basis: "typical" });
    expect(sj.parameters[0].note).toContain("Gillooly et al. 2001");
    expect(sj.parameters[2]).toMatchObject({ key: "valueAtReference", unit: "per year (hazard)", basis: null });
    expect(c.responses[2].optimum).toBeCloseTo((4 * 22 + 3 * 4 + Math.sqrt(16 * 22 * 22 + 9 * 4 * 4 - 16 * 4 * 22)) / 10, 12);
    expect(c.window).toHaveLength(1);
    expect(c.window[0].lower).toBe(tab.window[0].lower.temperature);
    expect(c.window[0].upper).toBe(tab.window[0].upper.temperature);
    expect(c.optimum).toEqual(tab.optimum);
    expect(c.slope).toMatchObject({ temperature: 11.5, basis: "trajectory", slope: tab.slope.slope, lambda: tab.slope.lambda });
    expect(c.slope.contributions.map((k: { name: string }) => k.name)).toEqual(["s_j", "s_e", "m"]);
    const sum = c.slope.contributions.reduce((t: number, k: { contribution: number }) => t + k.contribution, 0);
    expect(sum).toBeCloseTo(c.slope.slope, 12);
    const r = run.result;
    expect(c.warming).toMatchObject({ runId: run.id, replicates: 200, seed: 5, threshold: 40, initialTotal: 400, firstYear: 2026, lastYear: 2125 });
    expect(c.warming.firstYearBelowOne).toBe(r.deterministic.firstYearBelowOne);
    expect(c.warming.firstYearBelowOne).not.toBeNull();
    expect(c.warming.shareBelowThresholdAtEnd).toBe(r.belowThreshold[r.belowThreshold.length - 1]);
    expect(c.cautions.join(" ")).toContain("extrapolation");
    expect(c.cautions.join(" ")).not.toContain("Illustrative defaults");
    expect(res.body.figures.climate).toMatch(/^<svg[\s\S]*λ ≥ 1/);
    expect(res.body.figures.climate).toContain(celsiusText(c.window[0].lower));
    expect(res.body.figures.warming).toMatch(/^<svg/);

    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${id}/report.pdf`)).body as Buffer);
    const t = flat(text);
    expect(text).toMatch(/^Climate$/m);
    expect(t).toContain(`Persistence window (λ ≥ 1): ${celsiusText(c.window[0].lower)} – ${celsiusText(c.window[0].upper)}.`);
    expect(t).toContain(`Highest λ in the range: ${formatLambda(c.optimum.lambda)} at ${celsiusText(c.optimum.temperature)}.`);
    expect(t).toContain("At 11.5 °C (the first year of the warming trajectory)");
    expect(t).toContain("Boltzmann–Arrhenius, on the hazard");
    expect(t).toContain(run.id);
    expect(t).toContain(`λ_t first falls below 1 in ${c.warming.firstYearBelowOne}.`);
    expect(t).toContain(`are below 40 individuals`);
    expect(t).toContain("Cautions for these Climate results");
    expect(t).toContain("are extrapolation");
  }, 150_000);

  it("uses the Climate tab's default range when none is saved, and names illustrative defaults among the cautions", async () => {
    const doc = warmableLifeCycle({ s_a: defaultResponse("gaussian-quadratic", { value: 0.85, probability: true }) });
    const id = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc })).body.id as string;
    const c = (await owner.get(`/api/v1/life-cycles/${id}/report`)).body.climate;
    expect(c.range).toEqual({ min: 0, max: 35, saved: false });
    expect(c.warming).toBeNull();
    // Without a trajectory and with one Arrhenius reference (20 °C), the slope is reported there.
    expect(c.slope).toMatchObject({ temperature: 20, basis: "reference" });
    const sa = c.responses.find((r: { rateName: string }) => r.rateName === "s_a");
    expect(sa.parameters.filter((p: { basis: string | null }) => p.basis === "illustrative").map((p: { key: string }) => p.key)).toEqual(["optimum", "width", "criticalMaximum"]);
    const caution = c.cautions.find((x: string) => x.startsWith("Illustrative defaults"));
    expect(caution).toContain("s_a: Optimum temperature = 22 °C");
    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${id}/report.pdf`)).body as Buffer);
    expect(flat(text)).toContain("s_a: Optimum temperature = 22 °C");
    expect(flat(text)).toContain("(the Climate tab's default range)");
  });

  it("says when the window runs past both ends of the range, as the Climate tab writes it", async () => {
    // λ ≥ 1 roughly from 12 to 28 °C (tests/factories/climate.ts): a range of 15–20 °C lies inside the window.
    const doc = warmableLifeCycle({}, { climate: { range: { min: 15, max: 20 } } });
    const id = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: doc })).body.id as string;
    const c = (await owner.get(`/api/v1/life-cycles/${id}/report`)).body.climate;
    expect(c.window).toEqual([{ from: 15, to: 20, lower: null, upper: null }]);
    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${id}/report.pdf`)).body as Buffer);
    const t = flat(text);
    expect(t).toContain("Persistence window (λ ≥ 1): below 15 °C – above 20 °C. The window runs past the end of the range");
    expect(t).not.toContain("Its edges are found by root-finding");
  });

  it("has no Climate section for a life cycle without thermal responses", async () => {
    const res = await owner.get(`/api/v1/life-cycles/${lifeCycleId}/report`);
    expect(res.body.climate).toBeNull();
    expect(res.body.figures.climate).toBeNull();
    const { text } = await pdfText((await getPdf(`/api/v1/life-cycles/${lifeCycleId}/report.pdf`)).body as Buffer);
    expect(text).not.toMatch(/^Climate$/m);
    expect(text).not.toContain("Persistence window");
  });
});

describe("Study zip", () => {
  it("holds each life cycle's JSON, matrices, results and report, with formula-looking text escaped", async () => {
    const doc = threeStageLifeCycle({ name: "=HYPERLINK(\"http://example.org\")" });
    doc.stages[0]!.name = "=1+2";
    doc.stages[1]!.name = "+SUM(A1)";
    doc.stages[2]!.name = "@adult";
    const sid = (await owner.post("/api/v1/studies", { name: "Zip Study" })).body.id;
    await owner.post(`/api/v1/studies/${sid}/life-cycles`, { document: doc });
    const res = await getPdf(`/api/v1/studies/${sid}/export.zip`);
    expect(res.status).toBe(200);
    expect(res.headers["content-type"]).toBe("application/zip");
    expect(res.headers["content-disposition"]).toContain('filename="zip-study-stagewright.zip"');
    const files = unzipSync(new Uint8Array(res.body as Buffer));
    const dir = "life-cycles/hyperlink-http-example-org";
    expect(Object.keys(files).sort()).toEqual(
      ["README.txt", ...["hyperlink-http-example-org.stagewright.json", "matrix-A.csv", "matrix-F.csv", "matrix-U.csv", "report.pdf", "results.csv"].map((f) => `${dir}/${f}`)].sort(),
    );
    expect(JSON.parse(strFromU8(files[`${dir}/hyperlink-http-example-org.stagewright.json`]!))).toEqual(doc);
    const matrix = strFromU8(files[`${dir}/matrix-A.csv`]!);
    // Header: stage names as text, escaped; entries: plain numbers.
    expect(matrix.split("\r\n")[0]).toBe(",'=1+2,'+SUM(A1),'@adult");
    expect(matrix.split("\r\n")[1]).toBe("'=1+2,0,0,1.6");
    const results = strFromU8(files[`${dir}/results.csv`]!);
    expect(results.split("\r\n")[0]).toBe('Stagewright results,"\'=HYPERLINK(""http://example.org"")"');
    expect(results).not.toMatch(/(^|,)[=+@]/m);
    const pdf = files[`${dir}/report.pdf`]!;
    expect(strFromU8(pdf.subarray(0, 5))).toBe("%PDF-");
    expect(strFromU8(files["README.txt"]!)).toContain("matrix-A.csv");
  });

  it("refuses a Study over the export limit with a clear message", async () => {
    // The limit is read at request time, like the public address.
    const before = server.config.exportLimitBytes;
    server.config.exportLimitBytes = 2000;
    try {
      const sid = (await owner.post("/api/v1/studies", { name: "Big" })).body.id;
      await owner.post(`/api/v1/studies/${sid}/life-cycles`, { document: threeStageLifeCycle() });
      const res = await owner.get(`/api/v1/studies/${sid}/export.zip`);
      expect(res.status, JSON.stringify(res.body)).toBe(413);
      expect(res.body.error.message).toMatch(/passed the limit of 0\.0 MB/);
      expect(res.body.error.message).toContain("EXPORT_LIMIT_MB");
    } finally {
      server.config.exportLimitBytes = before;
    }
  });
});
