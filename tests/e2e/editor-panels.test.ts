/**
 * The editor's Rates, Matrix, Results, History and Export tabs in Debian's
 * Chromium, driven the way a person uses them; what was saved is checked
 * through the API (GET /life-cycles/:id) after the editor's autosave.
 */
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { LifeCycleSchema, type LifeCycle } from "../../shared/lifecycle";
import type { LifeCycleRecord } from "../../shared/schemas/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";

type Agent = BrowserAgent & { user: { email: string; password: string; name: string; id: string } };

let server: TestServer;
let owner: Agent;
let studyId: string;

/** A small invented life cycle with formulas; `s_j2` is there to prove renames work by whole names. */
function newtLifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Kessel Marsh newts",
    census: "pre-breeding",
    timeStepUnit: "year",
    notes: "Invented data for the browser tests.",
    stages: [
      { id: "st_juv", name: "Juvenile", position: { x: 0, y: 0 } },
      { id: "st_sub", name: "Subadult", position: { x: 220, y: 0 } },
      { id: "st_adu", name: "Adult", position: { x: 440, y: 0 }, color: "#2f6b5a" },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.3, se: 0.04, source: "Mark–recapture 2021–2025" },
      { id: "vr_sj2", name: "s_j2", value: 0.5, ci: { lower: 0.38, upper: 0.62, level: 0.95 } },
      { id: "vr_sa", name: "s_a", value: 0.8, unit: "per year" },
      { id: "vr_m", name: "m", value: 4.5, unit: "female juveniles per female", notes: "Clutch counts, 2023." },
    ],
    transitions: [
      { id: "tr_js", from: "st_juv", to: "st_sub", kind: "growth", rate: "s_j" },
      { id: "tr_sa", from: "st_sub", to: "st_adu", kind: "growth", rate: "s_j2" },
      { id: "tr_aa", from: "st_adu", to: "st_adu", kind: "stasis", rate: "s_a" },
      { id: "tr_aj", from: "st_adu", to: "st_juv", kind: "reproduction", rate: "s_j * m" },
    ],
    ...overrides,
  });
}

async function createLifeCycle(agent: Agent, document: LifeCycle): Promise<LifeCycleRecord> {
  const res = await agent.post(`/api/v1/studies/${studyId}/life-cycles`, { document });
  expect(res.status).toBe(201);
  return res.body as LifeCycleRecord;
}

/** The saved life cycle once `until` holds (the editor saves a moment after each change). */
async function savedWhen(agent: Agent, lifeCycleId: string, until: (doc: LifeCycle) => boolean, timeoutMs = 15_000): Promise<LifeCycle> {
  const deadline = Date.now() + timeoutMs;
  for (;;) {
    const res = await agent.get(`/api/v1/life-cycles/${lifeCycleId}`);
    expect(res.status).toBe(200);
    const doc = (res.body as LifeCycleRecord).document;
    if (until(doc)) return doc;
    if (Date.now() > deadline) throw new Error(`The saved document never reached the expected state: ${JSON.stringify(doc)}`);
    await new Promise((r) => setTimeout(r, 200));
  }
}

async function signIn(page: Page, user: { email: string; password: string }) {
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel("E-mail").fill(user.email);
  await page.getByLabel("Password").fill(user.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

async function openTab(page: Page, lifeCycleId: string, tab: string) {
  await page.goto(`${server.url}/life-cycles/${lifeCycleId}?tab=${tab.toLowerCase()}`);
  await page.getByRole("heading", { name: new RegExp(`^${tab}$`, "i"), level: 2 }).waitFor();
}

beforeAll(async () => {
  server = await startTestServer();
  owner = (await signUpAgent(server, { name: "Owen Owner" })) as Agent;
  const study = await owner.post("/api/v1/studies", { name: "Kessel Marsh" });
  expect(study.status).toBe(201);
  studyId = study.body.id as string;
});

afterAll(async () => {
  await server?.close();
});

/** A page in a browser of its own (so each test signs in afresh), signed in as `user`; page errors fail the test. */
async function signedInPage(user: { email: string; password: string }, run: (page: Page) => Promise<void>) {
  const browser = await launchBrowser();
  try {
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    await signIn(page, user);
    await run(page);
    expect(errors()).toEqual([]);
  } finally {
    await browser.close();
  }
}

describe("the editor's panels", () => {
  it("a number typed into an empty matrix cell becomes a new arrow, in the Matrix and in the saved document", async () => {
    const record = await createLifeCycle(owner, newtLifeCycle());
    await signedInPage(owner.user, async (page) => {
      await openTab(page, record.id, "Matrix");

      // Rows are "to", columns "from": the caption and the description say so.
      await page.getByText("Rows are the stage at the next census").waitFor();
      // A formula cell is shown, not offered for typing.
      expect(await page.getByRole("textbox", { name: "Entry from Juvenile to Subadult" }).count()).toBe(0);
      await page.getByRole("button", { name: /Entry from Juvenile to Subadult: 0\.3 \(growth s_j\)/ }).waitFor();

      // Stasis on the diagonal by default.
      const diagonal = page.getByRole("textbox", { name: "Entry from Subadult to Subadult" });
      await diagonal.fill("0.25");
      await diagonal.press("Enter");
      await page.getByText("Add stasis arrow Subadult → Subadult.").waitFor();
      expect(await diagonal.inputValue()).toBe("0.25");

      // A reproduction arrow when the person picks that kind.
      await page.getByRole("radio", { name: /reproduction arrows/ }).check();
      const fromSubadult = page.getByRole("textbox", { name: "Entry from Subadult to Juvenile" });
      await fromSubadult.fill("1.2");
      await fromSubadult.press("Enter");
      await page.getByText("Add reproduction arrow Subadult → Juvenile.").waitFor();

      // A negative entry is refused where it was typed, and nothing changes.
      const other = page.getByRole("textbox", { name: "Entry from Juvenile to Adult" });
      await other.fill("-1");
      await other.press("Enter");
      await page.getByText("A number ≥ 0.").waitFor();
      await other.press("Escape");

      const saved = await savedWhen(owner, record.id, (d) => d.transitions.length === 6);
      const added = saved.transitions.filter((t) => !["tr_js", "tr_sa", "tr_aa", "tr_aj"].includes(t.id));
      expect(added.map(({ from, to, kind, rate }) => ({ from, to, kind, rate }))).toEqual([
        { from: "st_sub", to: "st_sub", kind: "stasis", rate: 0.25 },
        { from: "st_sub", to: "st_juv", kind: "reproduction", rate: 1.2 },
      ]);

      // Replacing a formula with a number is an explicit action in the cell's panel.
      await page.getByRole("button", { name: /Entry from Adult to Juvenile/ }).click();
      await page.getByRole("heading", { name: "Cell from Adult (column) to Juvenile (row)" }).waitFor();
      await page.getByRole("button", { name: "Replace formula with a number" }).click();
      const replaced = await savedWhen(owner, record.id, (d) => typeof d.transitions.find((t) => t.id === "tr_aj")?.rate === "number");
      expect(replaced.transitions.find((t) => t.id === "tr_aj")!.rate).toBeCloseTo(0.3 * 4.5, 12);

      // Zero removes the arrow again.
      await diagonal.fill("0");
      await diagonal.press("Enter");
      await savedWhen(owner, record.id, (d) => !d.transitions.some((t) => t.from === "st_sub" && t.to === "st_sub"));

      await page.getByRole("checkbox", { name: /Shade cells by elasticity/ }).check();
      await page.screenshot({ path: ".data/e2e-matrix.png", fullPage: true });
    });
  });

  it("renaming a rate rewrites the formulas that use it, and only whole names", async () => {
    const record = await createLifeCycle(owner, newtLifeCycle());
    await signedInPage(owner.user, async (page) => {
      await openTab(page, record.id, "Rates");

      // Each rate lists the arrows whose formulas use it.
      const usedBy = page.getByRole("list", { name: "Arrows using s_j", exact: true });
      await expect.poll(() => usedBy.getByRole("listitem").allInnerTexts()).toEqual(["Juvenile → Subadult (growth): s_j", "Adult → Juvenile (reproduction): s_j * m"]);

      // A duplicate name is refused as it is typed.
      const name = page.getByRole("textbox", { name: "Name of rate s_j", exact: true });
      await name.fill("s_a");
      await page.getByText("Another vital rate is already named s_a").waitFor();
      await name.fill("s_juv");
      await name.press("Enter");
      await page.getByText("Renamed s_j to s_juv; 2 formulas updated.").waitFor();
      await expect
        .poll(() => page.getByRole("list", { name: "Arrows using s_juv", exact: true }).getByRole("listitem").allInnerTexts())
        .toEqual(["Juvenile → Subadult (growth): s_juv", "Adult → Juvenile (reproduction): s_juv * m"]);
      await expect.poll(() => page.getByRole("list", { name: "Arrows using s_j2", exact: true }).getByRole("listitem").allInnerTexts()).toEqual(["Subadult → Adult (growth): s_j2"]);

      // A value outside [0, 1] where an arrow uses the rate as a probability is a warning, not an error.
      const value = page.getByRole("textbox", { name: "Value of s_a" });
      await value.fill("80");
      await value.press("Enter");
      await page.getByText("Was it typed as a percentage?").waitFor();

      const saved = await savedWhen(owner, record.id, (d) => d.rates.some((r) => r.name === "s_juv") && d.rates.find((r) => r.id === "vr_sa")?.value === 80);
      expect(saved.rates.map((r) => r.name)).toEqual(["s_juv", "s_j2", "s_a", "m"]);
      expect(Object.fromEntries(saved.transitions.map((t) => [t.id, t.rate]))).toEqual({ tr_js: "s_juv", tr_sa: "s_j2", tr_aa: "s_a", tr_aj: "s_juv * m" });

      await page.screenshot({ path: ".data/e2e-rates.png", fullPage: true });
    });
  });

  it("a life cycle imported from a file, exported and imported again is the same document", async () => {
    const original = newtLifeCycle({ name: "Round trip newts" });
    const dir = fs.mkdtempSync(path.join(os.tmpdir(), "sw-roundtrip-"));
    const file = path.join(dir, "round-trip.stagewright.json");
    fs.writeFileSync(file, JSON.stringify(original, null, 2));
    try {
      await signedInPage(owner.user, async (page) => {
        const importFile = async (filePath: string) => {
          await page.goto(`${server.url}/studies/${studyId}`);
          await page.getByRole("button", { name: /from a template or file/i }).click();
          await page.getByRole("tab", { name: "Stagewright file" }).click();
          await page.getByLabel("Stagewright life-cycle file (.json)").setInputFiles(filePath);
          await page.getByRole("button", { name: "Create from file" }).click();
          await page.waitForURL(/\/life-cycles\/[^/?]+/);
          return new URL(page.url()).pathname.split("/").pop()!;
        };

        // First import, through the Study page.
        const firstId = await importFile(file);
        await openTab(page, firstId, "Export");
        const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Download JSON" }).click()]);
        expect(download.suggestedFilename()).toBe("round-trip-newts.stagewright.json");
        const exportedPath = path.join(dir, download.suggestedFilename());
        await download.saveAs(exportedPath);
        const exported = JSON.parse(fs.readFileSync(exportedPath, "utf8")) as unknown;
        expect(exported).toEqual(original);

        // Second import of the exported file.
        const secondId = await importFile(exportedPath);
        expect(secondId).not.toBe(firstId);
        const res = await owner.get(`/api/v1/life-cycles/${secondId}`);
        expect((res.body as LifeCycleRecord).document).toEqual(original);
      });
    } finally {
      fs.rmSync(dir, { recursive: true, force: true });
    }
  });

  it("Results show λ with a verdict, the checks and the cautions; a stage at fault is a button", async () => {
    // The last stage is a dead end (post-breeders): reducible, so a check names it.
    const doc = newtLifeCycle({
      name: "Results newts",
      stages: [...newtLifeCycle().stages, { id: "st_old", name: "Post-breeder", position: { x: 660, y: 0 } }],
      transitions: [...newtLifeCycle().transitions, { id: "tr_ao", from: "st_adu", to: "st_old", kind: "growth", rate: 0.1 }, { id: "tr_oo", from: "st_old", to: "st_old", kind: "stasis", rate: 0.5 }],
    });
    const record = await createLifeCycle(owner, doc);
    const analysis = (await owner.get(`/api/v1/life-cycles/${record.id}/analysis`)).body as { lambda: number };
    await signedInPage(owner.user, async (page) => {
      await openTab(page, record.id, "Results");

      await expect.poll(() => page.getByTestId("lambda").innerText()).toBe(`λ = ${analysis.lambda.toFixed(4)}`);
      await page.getByText(/^(Declining|Growing) about [\d.]+ % a year$/).waitFor();
      await page.getByText("Pre-breeding census:").waitFor();
      await page.getByText(/scaled so that v = 1 for Juvenile/).first().waitFor();
      await page.getByText("Results support and do not replace expert judgement", { exact: false }).waitFor();
      await page.getByText("structural zero — not a lever").count().then((n) => expect(n).toBe(0));
      await page.getByRole("checkbox", { name: /Include structural zeros/ }).check();
      expect(await page.getByText("structural zero — not a lever").count()).toBeGreaterThan(0);

      // The reducible life cycle is explained, with the stage as a button that selects it.
      await page.screenshot({ path: ".data/e2e-results.png", fullPage: true });
      await page.getByRole("button", { name: "Post-breeder" }).first().click();
      await page.getByRole("tab", { name: "Diagram", selected: true }).waitFor();

      // A projection from numbers typed in.
      await openTab(page, record.id, "Results");
      await page.getByRole("textbox", { name: "Adult", exact: true }).fill("100");
      await page.getByRole("button", { name: "Project" }).click();
      await page.getByText(/From 100 individuals now to [\d.,]+ (× 10\S+ )?individuals after 50 years\./).waitFor();
      await page.getByRole("img", { name: /Projected numbers over 50 time steps/ }).waitFor();
      await page.getByRole("checkbox", { name: "Log scale" }).check();
      await page.getByText("individuals (log scale)").waitFor();
      await page.screenshot({ path: ".data/e2e-projection.png", fullPage: true });

      // A value that makes an arrow negative: the model cannot be analysed, and Results say so over the last good numbers.
      await page.getByRole("tab", { name: "Rates" }).click();
      const value = page.getByRole("textbox", { name: "Value of s_a" });
      await value.fill("-0.5");
      await value.press("Enter");
      await page.getByRole("tab", { name: "Results" }).click();
      await page.getByText("Last good result — the current model has an error:").waitFor();
      await page.getByText(/Adult → Adult \(stasis\):/).waitFor();
      expect(await page.getByTestId("lambda").innerText()).toBe(`λ = ${analysis.lambda.toFixed(4)}`);
      expect(await page.locator("[data-stale]").count()).toBe(1);
    });
  });

  it("History takes a snapshot, shows what changed since, and restores it", async () => {
    const record = await createLifeCycle(owner, newtLifeCycle({ name: "History newts" }));
    await signedInPage(owner.user, async (page) => {
      await openTab(page, record.id, "History");
      await page.getByLabel("What this snapshot is").fill("rates from the 2025 survey");
      await page.getByRole("button", { name: "Take snapshot" }).click();
      await page.getByText("Took snapshot #1.").waitFor();

      // Change a rate through the API (as a colleague would) and compare.
      const current = (await owner.get(`/api/v1/life-cycles/${record.id}`)).body as LifeCycleRecord;
      const changed = { ...current.document, rates: current.document.rates.map((r) => (r.name === "s_a" ? { ...r, value: 0.7 } : r)) };
      expect((await owner.put(`/api/v1/life-cycles/${record.id}`, { version: current.version, document: changed })).status).toBe(200);
      await openTab(page, record.id, "History");
      await page.getByRole("button", { name: "Compare snapshot #1 with the current state" }).click();
      const diff = page.getByRole("region", { name: /Changes from snapshot #1 to the current state/ });
      await diff.getByRole("row", { name: /s_a value/ }).waitFor();
      expect(await diff.getByRole("row", { name: /s_a value/ }).innerText()).toMatch(/was\s+0\.8\s*→\s*now\s+0\.7/);
      expect(await diff.getByRole("row", { name: /Adult\s+Adult/ }).innerText()).toMatch(/0\.8\s+0\.7/);

      await page.getByRole("button", { name: "Restore snapshot #1" }).click();
      await page.getByRole("button", { name: "Restore this snapshot" }).click();
      await page.getByText(/Restored snapshot #1; it is now the current state/).waitFor();
      const restored = await savedWhen(owner, record.id, (d) => d.rates.find((r) => r.name === "s_a")?.value === 0.8);
      expect(restored).toEqual(current.document);
      await page.screenshot({ path: ".data/e2e-history.png", fullPage: true });
    });
  });

  it("a viewer sees the panels without any editing controls", async () => {
    const record = await createLifeCycle(owner, newtLifeCycle({ name: "Viewer newts" }));
    const viewer = (await signUpAgent(server, { name: "Vera Viewer" })) as Agent;
    expect((await owner.post(`/api/v1/studies/${studyId}/invitations`, { email: viewer.user.email, role: "viewer" })).status).toBe(201);
    const token = (await server.mailTo(viewer.user.email)).links.find((l) => l.includes("/invitations/"))!.split("/invitations/")[1]!;
    expect((await viewer.post(`/api/v1/invitations/${token}/accept`)).status).toBe(200);

    await signedInPage(viewer.user, async (page) => {
      for (const tab of ["Rates", "Matrix"]) {
        await openTab(page, record.id, tab);
        const panel = page.getByRole("tabpanel");
        await panel.getByRole("table").first().waitFor();
        expect(await panel.getByRole("textbox").count()).toBe(0);
        expect(await panel.getByRole("button", { name: /add|remove|replace/i }).count()).toBe(0);
      }
      await page.getByRole("button", { name: /Entry from Adult to Juvenile/ }).click();
      await page.getByText("formula").first().waitFor();
      expect(await page.getByRole("button", { name: "Replace formula with a number" }).count()).toBe(0);
      await openTab(page, record.id, "History");
      expect(await page.getByRole("button", { name: "Take snapshot" }).count()).toBe(0);
      expect(await page.getByRole("button", { name: /^Restore/ }).count()).toBe(0);
    });
  });
});
