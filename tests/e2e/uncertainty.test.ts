// Uncertainty in Debian's Chromium, against a real server and a real worker:
// an editor enters an SE for a rate on the Rates tab and sees λ's interval
// and P(λ < 1) appear in the Results headline; an impossible SE is reported
// beside the rate; counts k of n are entered; then a Monte Carlo Run is
// started on the Uncertainty tab, its progress shows, and its results (P(λ < 1),
// the histogram and the rank stability of levers) match the stored Run.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { UncertaintyRun } from "../../src/api/runs";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

type Agent = BrowserAgent & { user: { email: string; password: string; name: string; id: string } };

let server: TestServer;
let worker: ReturnType<typeof startWorker>;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let owner: Agent;
let lifeCycleId: string;

beforeAll(async () => {
  server = await startTestServer();
  worker = startWorker(server.databaseUrl);
  browser = await launchBrowser();
  owner = (await signUpAgent(server, { name: "Una Certain" })) as Agent;
  const studyId = (await owner.post("/api/v1/studies", { name: "Bog frogs" })).body.id as string;
  const created = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "North bog" }) });
  expect(created.status).toBe(201);
  lifeCycleId = created.body.id as string;
});

afterAll(async () => {
  await browser?.close();
  await worker?.stop();
  await server?.close();
});

async function signIn(page: Page) {
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel("E-mail").fill(owner.user.email);
  await page.getByLabel("Password").fill(owner.user.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

const tab = (page: Page, name: string) => page.getByRole("tab", { name, exact: true });

/** Waits until every change is saved (the header says so). */
async function saved(page: Page) {
  await expect.poll(async () => (await owner.get(`/api/v1/life-cycles/${lifeCycleId}`)).body.version, { timeout: 10_000 }).toBeGreaterThan(1);
  await page.getByText("Saved", { exact: false }).first().waitFor();
}

describe("uncertainty of the results", () => {
  it("an SE entered for a rate gives λ an interval in Results; a Monte Carlo Run reports P(λ < 1) and rank stability", async () => {
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    try {
      await signIn(page);
      await page.goto(`${server.url}/life-cycles/${lifeCycleId}?tab=results`);
      await page.getByTestId("lambda").waitFor();
      expect(await page.getByTestId("lambda-interval").count()).toBe(0);
      await page.getByText("No vital rate carries its uncertainty yet.").waitFor();

      // An impossible SE first: reported beside the rate, naming it.
      await tab(page, "Rates").click();
      const seAdult = page.getByLabel("Standard error of s_a");
      await seAdult.fill("0.5");
      await seAdult.press("Enter");
      await page.getByText("An SE of 0.5 is impossible for s_a: a beta distribution with mean 0.85 needs an SE below √(p(1 − p)) = 0.3571.").waitFor();
      await seAdult.fill("0.04");
      await seAdult.press("Enter");
      await expect.poll(() => page.locator("[data-uncertainty-issue]").count()).toBe(0);

      // Counts for juvenile survival: 30 of 100.
      await page.getByRole("row", { name: /s_j/ }).getByRole("button", { name: "Counts or a distribution…" }).click();
      await page.getByLabel("k, individuals that did it, for s_j").fill("30");
      await page.getByLabel("n, individuals at risk, for s_j").fill("100");
      await page.getByLabel("n, individuals at risk, for s_j").press("Enter");
      await page.screenshot({ path: ".data/e2e-uncertainty-rates.png", fullPage: true });

      // λ's interval appears in the headline.
      await tab(page, "Results").click();
      const interval = page.getByTestId("lambda-interval");
      await interval.waitFor();
      const analysis = (await owner.post("/api/v1/analyze", { document: { ...threeStageLifeCycle({ name: "North bog" }), rates: withUncertainty() } })).body;
      const u = analysis.uncertainty.lambda;
      await expect.poll(() => interval.textContent()).toContain(`95 % interval ${u.lower.toFixed(4)}–${u.upper.toFixed(4)}`);
      expect(await page.getByTestId("lambda-below-one").textContent()).toBe(`P(λ < 1) = ${(u.probabilityBelowOne * 100).toFixed(1)} %`);
      await page.getByRole("heading", { name: "How sure: uncertainty from the rates" }).scrollIntoViewIfNeeded();
      await page.screenshot({ path: ".data/e2e-uncertainty-results.png", fullPage: true });

      // The Monte Carlo Run on the saved life cycle.
      await saved(page);
      await tab(page, "Uncertainty").click();
      await page.getByText("No Monte Carlo Run yet.").waitFor();
      await page.getByLabel("Draws").fill("20000");
      await page.getByLabel(/^Seed/).fill("11");
      await page.getByRole("button", { name: "Start a Monte Carlo Run" }).click();
      await page.getByTestId("mc-below-one").waitFor({ timeout: 120_000 });
      const runs = (await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body as { id: string }[];
      expect(runs).toHaveLength(1);
      const run = (await owner.get(`/api/v1/runs/${runs[0]!.id}`)).body as UncertaintyRun;
      expect(run.status).toBe("succeeded");
      const r = run.result!;
      expect(r.draws).toBe(20_000);
      expect(await page.getByTestId("mc-below-one").textContent()).toContain(`P(λ < 1) = ${(r.lambda.probabilityBelowOne * 100).toFixed(1)} %`);
      expect(await page.getByTestId("mc-below-one").textContent()).toContain("from 20,000 draws, seed 11");
      const top = r.rateLevers[0]!;
      expect(await page.getByTestId("rank-stability-verdict").textContent()).toContain(`largest elasticity is ${top.name}’s. It ranks first in ${(top.rankFirst * 100).toFixed(1)} %`);
      await page.getByRole("img", { name: /^Histogram of λ over 20,000 draws/ }).locator("svg").waitFor();
      await page.screenshot({ path: ".data/e2e-uncertainty-monte-carlo.png", fullPage: true });

      // Levers shows the same rank stability beside its ranking.
      await tab(page, "Levers").click();
      const cell = page.locator(`[data-testid="levers-ranking"] tr[data-lever="${top.name}"] [data-col="rank-first"]`);
      await expect.poll(() => cell.textContent(), { timeout: 15_000 }).toBe(`${Number((top.rankFirst * 100).toPrecision(3))} %`);
      await page.getByTestId("levers-rank-stability-note").waitFor();
      expect(errors()).toEqual([]);
    } catch (error) {
      await page.screenshot({ path: ".data/e2e-uncertainty-failure.png", fullPage: true }).catch(() => undefined);
      throw error;
    } finally {
      await page.close();
    }
  }, 240_000);
});

/** The factory's rates with what the test entered. */
function withUncertainty() {
  return threeStageLifeCycle().rates.map((r) => (r.name === "s_a" ? { ...r, se: 0.04 } : r.name === "s_j" ? { ...r, counts: { k: 30, n: 100 } } : r));
}
