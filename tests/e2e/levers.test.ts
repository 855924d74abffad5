/**
 * The Levers tab in Debian's Chromium, used the way a person does: build two
 * scenarios, read their λ in the comparison table (checked against λ of the
 * changed life cycle computed here), see a refused change, rank the levers,
 * and run an LTRE against another life cycle of the Study.
 */
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { analyzeMatrix } from "../../shared/demography";
import { buildMatrices, LifeCycleSchema, type LifeCycle } from "../../shared/lifecycle";
import type { LifeCycleRecord } from "../../shared/schemas/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";

type Agent = BrowserAgent & { user: { email: string; password: string; name: string; id: string } };

let server: TestServer;
let owner: Agent;
let studyId: string;

/** An invented three-stage newt life cycle with formulas. */
function newtLifeCycle(overrides: Partial<LifeCycle> = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Levers newts",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [
      { id: "st_juv", name: "Juvenile", position: { x: 0, y: 0 } },
      { id: "st_sub", name: "Subadult", position: { x: 220, y: 0 } },
      { id: "st_adu", name: "Adult", position: { x: 440, y: 0 } },
    ],
    rates: [
      { id: "vr_sj", name: "s_j", value: 0.3 },
      { id: "vr_ss", name: "s_s", value: 0.5 },
      { id: "vr_sa", name: "s_a", value: 0.8 },
      { id: "vr_m", name: "m", value: 2.5 },
    ],
    transitions: [
      { id: "tr_js", from: "st_juv", to: "st_sub", kind: "growth", rate: "s_j" },
      { id: "tr_sa", from: "st_sub", to: "st_adu", kind: "growth", rate: "s_s" },
      { id: "tr_aa", from: "st_adu", to: "st_adu", kind: "stasis", rate: "s_a" },
      { id: "tr_aj", from: "st_adu", to: "st_juv", kind: "reproduction", rate: "s_j * m" },
    ],
    ...overrides,
  });
}

const lambdaOf = (doc: LifeCycle) => analyzeMatrix({ A: buildMatrices(doc).A }).lambda;
const withRate = (doc: LifeCycle, id: string, value: number): LifeCycle => ({ ...doc, rates: doc.rates.map((r) => (r.id === id ? { ...r, value } : r)) });

async function createLifeCycle(document: LifeCycle): Promise<LifeCycleRecord> {
  const res = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document });
  expect(res.status).toBe(201);
  return res.body as LifeCycleRecord;
}

async function signedInPage(run: (page: Page) => Promise<void>) {
  const browser = await launchBrowser();
  try {
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    await page.goto(`${server.url}/sign-in`);
    await page.getByLabel("E-mail").fill(owner.user.email);
    await page.getByLabel("Password").fill(owner.user.password);
    await page.getByRole("button", { name: "Sign in" }).click();
    await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
    await run(page);
    expect(errors()).toEqual([]);
  } finally {
    await browser.close();
  }
}

/** The λ the comparison table shows in a scenario's row, once the table holds that row. */
async function lambdaInRow(page: Page, name: string): Promise<string> {
  const cell = page.locator(`[data-testid="levers-comparison"] tr[data-scenario="${name}"] [data-col="lambda"]`);
  await cell.waitFor();
  return (await cell.textContent()) ?? "";
}

async function addChange(page: Page, scenario: string, change: string, operation: string, amount: string) {
  const form = page.getByRole("form", { name: `Add a change to ${scenario}` });
  await form.getByLabel("Change", { exact: true }).selectOption({ label: change });
  await form.getByLabel("Operation").selectOption({ label: operation });
  await form.getByLabel("Amount", { exact: true }).fill(amount);
  await form.getByRole("button", { name: "Add change" }).click();
}

beforeAll(async () => {
  server = await startTestServer();
  owner = (await signUpAgent(server, { name: "Lena Levers" })) as Agent;
  studyId = (await owner.post("/api/v1/studies", { name: "Levers study" })).body.id as string;
});

afterAll(async () => {
  await server?.close();
});

describe("the Levers tab", () => {
  it("builds two scenarios and reads their λ in the comparison table", async () => {
    const doc = newtLifeCycle();
    const record = await createLifeCycle(doc);
    await signedInPage(async (page) => {
      await page.goto(`${server.url}/life-cycles/${record.id}?tab=levers`);
      await page.getByRole("heading", { name: "Levers", level: 2 }).waitFor();
      expect(await lambdaInRow(page, "Baseline")).toBe(lambdaOf(doc).toFixed(4));
      await page.getByText("No scenarios yet.").waitFor();

      // First scenario: protect adults (s_a × 1.1).
      await page.getByRole("button", { name: "New scenario" }).click();
      const name1 = page.getByRole("textbox", { name: "Scenario name" }).first();
      await name1.fill("Protect adults");
      await name1.press("Enter");
      await addChange(page, "Protect adults", "s_a (vital rate)", "multiply by", "1.1");
      const a = withRate(doc, "vr_sa", 0.88);
      await expect.poll(() => lambdaInRow(page, "Protect adults"), { timeout: 15_000 }).toBe(lambdaOf(a).toFixed(4));

      // A change past a probability's bound is refused where it was typed, naming the rate and the bound
      // (changes build on each other: 0.8 × 1.1 + 0.3).
      await addChange(page, "Protect adults", "s_a (vital rate)", "add", "0.3");
      await page.getByText('Scenario "Protect adults" takes s_a to 1.18, above its upper bound 1 (it is a probability).').waitFor();

      // Second scenario: head-start juveniles (s_j set to 0.45), with a cost.
      await page.getByRole("button", { name: "New scenario" }).click();
      const name2 = page.getByRole("textbox", { name: "Scenario name" }).nth(1);
      await name2.fill("Head-start juveniles");
      await name2.press("Enter");
      const cost = page.getByRole("textbox", { name: "Cost" }).nth(1);
      await cost.fill("5");
      await cost.press("Enter");
      await addChange(page, "Head-start juveniles", "s_j (vital rate)", "set to", "0.45");
      const j = withRate(doc, "vr_sj", 0.45);
      await expect.poll(() => lambdaInRow(page, "Head-start juveniles"), { timeout: 15_000 }).toBe(lambdaOf(j).toFixed(4));
      expect(await lambdaInRow(page, "Protect adults")).toBe(lambdaOf(a).toFixed(4));
      await page.getByTestId("levers-per-cost").getByText("Head-start juveniles").waitFor();

      // The ranking lists every vital rate, and the cautions stay on the tab.
      const ranking = page.getByTestId("levers-ranking");
      for (const rate of ["s_j", "s_s", "s_a", "m"]) await ranking.locator(`tr[data-lever="${rate}"]`).waitFor();
      expect(await page.getByTestId("levers-cautions").textContent()).toMatch(/support and do not replace expert judgement/);
      await page.screenshot({ path: "/tmp/levers-e2e-scenarios.png", fullPage: true });
      // Autosave waits for a quiet moment after the last edit: leave only once the header says it is saved.
      await page.getByText(/Saved · version/).waitFor({ timeout: 15_000 });
    });

    // What the editor saved: both scenarios, in the document.
    const deadline = Date.now() + 15_000;
    let saved: LifeCycle;
    for (;;) {
      saved = (await owner.get(`/api/v1/life-cycles/${record.id}`)).body.document as LifeCycle;
      if ((saved.scenarios ?? []).length === 2 && saved.scenarios![1]!.changes.length === 1 && saved.scenarios![1]!.cost === 5) break;
      if (Date.now() > deadline) throw new Error(`The scenarios were not saved: ${JSON.stringify(saved.scenarios)}`);
      await new Promise((r) => setTimeout(r, 200));
    }
    expect(saved.scenarios!.map((s) => s.name)).toEqual(["Protect adults", "Head-start juveniles"]);
    expect(saved.scenarios![0]!.changes.map((c) => [c.target, c.op, c.value])).toEqual([[{ kind: "rate", rateId: "vr_sa" }, "multiply", 1.1]]);
  }, 120_000);

  it("decomposes the difference to another life cycle, and names the stages that do not match", async () => {
    const reference = newtLifeCycle({ name: "Pond A" });
    const record = await createLifeCycle(reference);
    const other = withRate({ ...reference, name: "Pond B" }, "vr_sa", 0.7);
    await createLifeCycle(other);
    await createLifeCycle(newtLifeCycle({ name: "Pond C", stages: reference.stages.map((s) => (s.id === "st_sub" ? { ...s, name: "Yearling" } : s)) }));
    await signedInPage(async (page) => {
      await page.goto(`${server.url}/life-cycles/${record.id}?tab=levers`);
      await page.getByLabel("Compare with").selectOption({ label: "Pond B" });
      const ltre = page.getByTestId("levers-ltre");
      await ltre.waitFor();
      const delta = lambdaOf(other) - lambdaOf(reference);
      await ltre.getByText(`−${Math.abs(delta).toFixed(4)}`, { exact: true }).first().waitFor();
      await ltre.getByRole("rowheader", { name: "s_a" }).waitFor();
      await page.getByLabel("Compare with").selectOption({ label: "Pond C" });
      await page.getByText('only in "Pond A": Subadult; only in "Pond C": Yearling').waitFor();
    });
  }, 120_000);
});
