// The Risk tab in Debian's Chromium, against a real server and a real worker
// process: an editor lets two vital rates vary, is stopped by an impossible
// SD for a beta next to its input (the form's check) and by a threshold the
// chosen stages already start below (the server's check, placed under the
// threshold input), starts a Run, watches the progress bar, and reads the
// quasi-extinction table and the criterion E table against the Run's stored
// result. A viewer of the Study reads the same Run without any Start button.
// A long Run can be cancelled.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Locator, Page } from "playwright-core";
import type { RiskRun } from "../../src/api/runs";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

type Agent = BrowserAgent & { user: { email: string; password: string; name: string; id: string } };

let server: TestServer;
let worker: ReturnType<typeof startWorker>;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let owner: Agent;
let studyId: string;
let lifeCycleId: string;
/** The Run the editor starts in the first test; the viewer reads it in the second. */
let runId: string | null = null;

const CAUTIONS =
  "Results support and do not replace expert judgement; status listings and management decisions follow the rules of the responsible authority and peer review; models are only as good as their data.";

beforeAll(async () => {
  server = await startTestServer();
  worker = startWorker(server.databaseUrl);
  browser = await launchBrowser();
  owner = (await signUpAgent(server, { name: "Rosa Runner" })) as Agent;
  studyId = (await owner.post("/api/v1/studies", { name: "Heathland lizards" })).body.id as string;
  const created = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Heath site" }) });
  expect(created.status).toBe(201);
  lifeCycleId = created.body.id as string;
});

afterAll(async () => {
  await browser?.close();
  await worker?.stop();
  await server?.close();
});

async function signIn(page: Page, user: { email: string; password: string }) {
  // A late response from the previous test's page can set its session cookie again after
  // the cookies were cleared: end any session first, then open the sign-in form.
  await page.goto(`${server.url}/sign-in`);
  await page.evaluate(async () => {
    const csrf = decodeURIComponent(document.cookie.split("; ").find((c) => c.startsWith("sw_csrf="))?.slice("sw_csrf=".length) ?? "");
    await fetch("/api/v1/auth/sign-out", { method: "POST", headers: { "X-CSRF-Token": csrf } });
  });
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel("E-mail").fill(user.email);
  await page.getByLabel("Password").fill(user.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

async function openRisk(page: Page) {
  await page.goto(`${server.url}/life-cycles/${lifeCycleId}`);
  await page.getByRole("tab", { name: "Risk" }).click();
  await page.getByRole("heading", { name: "Risk", level: 2 }).waitFor();
}

/** The text of the element(s) an input's aria-describedby points at, without decorative marks: what a screen reader reads with it. */
async function description(input: Locator): Promise<string> {
  return input.evaluate((el) =>
    (el.getAttribute("aria-describedby") ?? "")
      .split(" ")
      .filter(Boolean)
      .map((id) => {
        const copy = document.getElementById(id)?.cloneNode(true) as HTMLElement | undefined;
        copy?.querySelectorAll("[aria-hidden='true']").forEach((n) => n.remove());
        return copy?.textContent?.trim() ?? "";
      })
      .join(" "),
  );
}

/** "12.3 %" → 0.123. */
function percentOf(text: string): number {
  return Number(text.trim().replace(/\s*%$/, "")) / 100;
}

async function withPage(user: { email: string; password: string }, run: (page: Page) => Promise<void>, screenshotOnFailure: string) {
  const page = await browser.context.newPage();
  const errors = watchPageErrors(page);
  try {
    await signIn(page, user);
    await run(page);
    expect(errors()).toEqual([]);
  } catch (error) {
    await page.screenshot({ path: `.data/${screenshotOnFailure}`, fullPage: true }).catch(() => undefined);
    throw error;
  } finally {
    // Close first: a poll still in flight could otherwise set the session cookie again after it was cleared.
    await page.close();
    await browser.context.clearCookies();
  }
}

describe("the Risk tab", () => {
  it("an editor sets up a Run with two varying vital rates, sees the checks next to the fields, watches the progress and reads the results", async () => {
    await withPage(
      owner.user,
      async (page) => {
        await openRisk(page);
        expect(await page.getByTestId("risk-cautions").textContent()).toBe(CAUTIONS);
        await page.getByText("No Risk runs yet for this life cycle.").waitFor();

        // Two vital rates vary: adult survival (a probability: beta) and fecundity (only in a reproduction arrow: lognormal).
        await page.getByRole("checkbox", { name: "Vary s_a" }).check();
        await page.getByRole("checkbox", { name: "Vary f" }).check();
        expect(await page.getByLabel("Distribution of s_a").inputValue()).toBe("beta");
        expect(await page.getByLabel("Distribution of f").inputValue()).toBe("lognormal");
        // The mean starts at the rate's value in the life cycle.
        expect(await page.getByLabel("Mean of s_a").inputValue()).toBe("0.85");
        expect(await page.getByLabel("Mean of f").inputValue()).toBe("1.6");

        // An SD no beta distribution with mean 0.85 can have: the form says so under the SD, and nothing starts.
        const sdAdult = page.getByLabel("SD of s_a between years");
        await sdAdult.fill("0.4");
        await page.getByLabel("SD of f between years").fill("0.4");
        await page.getByLabel("Total individuals").fill("40");
        await page.getByLabel("Quasi-extinction threshold (individuals)").fill("5");
        await page.getByLabel("Horizon (years)").fill("50");
        await page.getByLabel("Replicates (simulated futures)").fill("30000");
        await page.getByText("More options").click();
        await page.getByLabel("Years for the table").fill("10, 20, 50");
        await page.getByLabel("Seed").fill("7");
        await page.getByRole("button", { name: "Start run" }).click();
        await expect.poll(() => sdAdult.getAttribute("aria-invalid")).toBe("true");
        expect(await description(sdAdult)).toContain("For a beta distribution with mean 0.85 the SD must be below √(mean·(1 − mean)) = 0.357071; got 0.4.");
        expect(await sdAdult.evaluate((el) => el === document.activeElement)).toBe(true);
        await page.screenshot({ path: ".data/e2e-risk-form-error.png" });
        expect((await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body).toEqual([]);
        await sdAdult.fill("0.1");
        await expect.poll(() => sdAdult.getAttribute("aria-invalid")).toBeNull();
        // A poorer site than the life cycle's value: adults survive 0.8 on average; fecundity varies a lot; few individuals.
        await page.getByLabel("Mean of s_a").fill("0.8");
        await page.getByLabel("SD of f between years").fill("0.6");
        await page.getByLabel("Demographic stochasticity").check();

        // The total is spread over the stages by the stable stage distribution, in whole individuals.
        const stages = ["Juvenile", "Subadult", "Adult"];
        const initial = await Promise.all(stages.map((s) => page.getByLabel(`Individuals in ${s}`).inputValue()));
        expect(initial.every((v) => /^\d+$/.test(v))).toBe(true);
        expect(initial.reduce((sum, v) => sum + Number(v), 0)).toBe(40);

        // A threshold on adults alone that the adults already start at or below: only the server can tell (it knows the
        // saved life cycle); its message lands under the threshold input.
        await page.getByLabel("Only the stages I choose (e.g. breeding adults)").check();
        await page.getByRole("checkbox", { name: "Adult", exact: true }).check();
        const threshold = page.getByLabel("Quasi-extinction threshold (individuals)");
        await threshold.fill("39");
        await page.getByRole("button", { name: "Start run" }).click();
        await expect.poll(() => threshold.getAttribute("aria-invalid"), { timeout: 10_000 }).toBe("true");
        expect(await description(threshold)).toMatch(/^The chosen stages start with \d+ individuals, already at or below the threshold \(39\)\.$/);
        expect((await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body).toEqual([]);
        await page.getByLabel("All stages together").check();
        await threshold.fill("5");

        // Start: the progress bar counts chunks while the worker computes.
        await page.getByRole("button", { name: "Start run" }).click();
        const bar = page.getByRole("progressbar", { name: "Progress of the Run" });
        await bar.waitFor({ timeout: 10_000 });
        const chunksText = (await page.getByTestId("run-chunks").textContent()) ?? "";
        const chunks = /^(\d+) of (\d+) chunks done \((\d+) %\)$/.exec(chunksText);
        expect(chunks, chunksText).not.toBeNull();
        expect(Number(chunks![2])).toBeGreaterThanOrEqual(2);
        expect(Number(chunks![1])).toBeLessThan(Number(chunks![2]));
        await page.screenshot({ path: ".data/e2e-risk-progress.png" });
        const runs = (await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body as { id: string; settings: { seed: number; initial: number[] } }[];
        expect(runs).toHaveLength(1);
        runId = runs[0]!.id;
        expect(runs[0]!.settings.seed).toBe(7);
        expect(runs[0]!.settings.initial.map(String)).toEqual(initial);

        // Results, once every chunk is done.
        await page.getByTestId("risk-results").waitFor({ timeout: 120_000 });
        expect(await bar.count()).toBe(0);
        const run = (await owner.get(`/api/v1/runs/${runId}`)).body as RiskRun;
        expect(run.status).toBe("succeeded");
        const result = run.result!;

        // The quasi-extinction table: one row per chosen year, the server's numbers.
        const table = page.getByTestId("quasi-extinction-table");
        const rows = await table.locator("tbody tr").all();
        expect(result.quasiExtinction.table.map((r) => r.year)).toEqual([10, 20, 50]);
        expect(rows).toHaveLength(3);
        for (const [k, row] of rows.entries()) {
          const expected = result.quasiExtinction.table[k]!;
          const cells = await row.locator("th, td").allTextContents();
          expect(cells[0]).toBe(String(expected.year));
          expect(percentOf(cells[1]!)).toBeCloseTo(expected.probability, 3);
          expect(cells[3]).toBe(`${expected.count.toLocaleString("en")} of 30,000`);
        }
        // Cumulative: never falls with time.
        const probabilities = result.quasiExtinction.table.map((r) => r.probability);
        expect([...probabilities].sort((a, b) => a - b)).toEqual(probabilities);
        expect(percentOf((await page.getByTestId("risk-share").textContent()) ?? "")).toBeCloseTo(result.quasiExtinction.share, 3);
        expect(await page.getByTestId("risk-lambda-s").textContent()).toBe(result.growthRate.simulated!.lambdaS.toFixed(4));
        expect(await page.getByTestId("risk-lambda-tuljapurkar").textContent()).toBe(result.growthRate.approximation!.lambdaS.toFixed(4));

        // Criterion E: one row per category with the server's probability and status. With about half of the futures
        // quasi-extinct by year 50 (far from every threshold, whatever the seed), CR is not met within 3 generations,
        // EN is met within 5, and VU is met although the Run is shorter than 100 years (the probability only grows).
        const criterion = page.getByTestId("criterion-e-table");
        const criterionRows = await criterion.locator("tbody tr").all();
        expect(criterionRows).toHaveLength(3);
        expect(result.criterionE.checks.map((c) => [c.category, c.status])).toEqual([
          ["CR", "not-met"],
          ["EN", "met"],
          ["VU", "met"],
        ]);
        const statusWords = { met: "Threshold met", "not-met": "Not met" } as const;
        for (const [k, row] of criterionRows.entries()) {
          const check = result.criterionE.checks[k]!;
          const text = await row.innerText();
          expect(text).toContain(`${check.name} (${check.category})`);
          expect(text).toContain(statusWords[check.status as "met" | "not-met"]);
          expect(percentOf((await row.locator("td").nth(2).locator("span").first().textContent()) ?? "")).toBeCloseTo(check.probability, 3);
        }
        expect(await page.getByTestId("criterion-e-verdict").textContent()).toBe("The highest category whose criterion E threshold this Run meets: Endangered (EN).");
        // The CR horizon: 3 generations, a generation being the mean age of parents (about 7.9 years here, so 3 of them exceed 10 years).
        const G = result.criterionE.generationLength!.years;
        expect(3 * G).toBeGreaterThan(10);
        expect(await criterionRows[0]!.locator("td").nth(1).innerText()).toContain(`3 generations = 3 × ${Number(G.toPrecision(3))} years (mean age of parents)`);
        expect(await criterionRows[2]!.locator("td").nth(1).innerText()).toContain("100 years");
        expect(await page.getByText("This Run is too short to judge every category.").count()).toBe(0);
        expect(await page.getByTestId("criterion-e-caution").textContent()).toBe(result.criterionE.caution);

        // The Run is in the list with what was asked.
        await page.getByText(/Vital rates vary \(s_a, f\) · 50 years · 30,000 replicates · quasi-extinct at ≤ 5 · demographic stochasticity/).waitFor();
        await page.getByRole("heading", { name: "Results of the shown Run" }).scrollIntoViewIfNeeded();
        await page.screenshot({ path: ".data/e2e-risk-results.png", fullPage: true });

        // The same settings again over 10 years: the form takes them back, refuses table years beyond the horizon next
        // to that input, and the short Run cannot judge any category.
        await page.getByRole("button", { name: "Put this Run’s settings in the form" }).click();
        expect(await page.getByLabel("Seed").inputValue()).toBe("7");
        expect(await page.getByLabel("Mean of s_a").inputValue()).toBe("0.8");
        expect(await page.getByLabel("Demographic stochasticity").isChecked()).toBe(true);
        await page.getByLabel("Horizon (years)").fill("10");
        await page.getByLabel("Replicates (simulated futures)").fill("2000");
        await page.getByRole("button", { name: "Start run" }).click();
        const tableYears = page.getByLabel("Years for the table");
        await expect.poll(() => tableYears.getAttribute("aria-invalid")).toBe("true");
        expect(await description(tableYears)).toContain("Year 20 is beyond the 10-year horizon.");
        await tableYears.fill("");
        await page.getByRole("button", { name: "Start run" }).click();
        await page.getByText("This Run is too short to judge every category.").waitFor({ timeout: 60_000 });
        await page.getByText("Start a new Run with a horizon of at least 100 years to judge them all.").waitFor();
        const gens = (n: number) => Number((n * G).toPrecision(3));
        await page.getByText(`CR needs ${gens(3)} years, EN needs ${gens(5)} years and VU needs 100 years, but the Run covers only 10 years.`, { exact: false }).waitFor();
        const shortRows = page.getByTestId("criterion-e-table").locator("tbody tr");
        expect(await shortRows.count()).toBe(3);
        for (const row of await shortRows.all()) expect(await row.innerText()).toContain("Run too short");
        expect((await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body).toHaveLength(2);
        await page.getByTestId("criterion-e-table").scrollIntoViewIfNeeded();
        await page.screenshot({ path: ".data/e2e-risk-short-run.png" });
      },
      "e2e-risk-editor-failure.png",
    );
  });

  it("a viewer reads the Run and its results, with no Start button", async () => {
    expect(runId).not.toBeNull();
    const viewer = (await signUpAgent(server, { name: "Vic Viewer" })) as Agent;
    expect((await owner.post(`/api/v1/studies/${studyId}/invitations`, { email: viewer.user.email, role: "viewer" })).status).toBe(201);
    const token = (await server.mailTo(viewer.user.email)).links.find((l) => l.includes("/invitations/"))!.split("/invitations/")[1]!;
    expect((await viewer.post(`/api/v1/invitations/${token}/accept`)).status).toBe(200);

    await withPage(
      viewer.user,
      async (page) => {
        await openRisk(page);
        await page.getByTestId("risk-results").waitFor();
        expect(await page.getByTestId("risk-cautions").textContent()).toBe(CAUTIONS);
        await page.getByText("Your role in this Study lets you read the Runs and their results; editors start new ones.").waitFor();
        expect(await page.getByRole("button", { name: "Start run" }).count()).toBe(0);
        expect(await page.getByRole("button", { name: /Cancel run|Put this Run/ }).count()).toBe(0);
        expect(await page.getByRole("tabpanel").getByRole("textbox").count()).toBe(0);
        expect(await page.getByTestId("criterion-e-table").locator("tbody tr").count()).toBe(3);
        // The newest Run is shown first; the earlier, longer one opens from the list.
        await page.getByText("This Run is too short to judge every category.").waitFor();
        await page.getByRole("button", { name: /^Show the Run started/ }).click();
        await expect
          .poll(() => page.getByTestId("criterion-e-verdict").textContent())
          .toBe("The highest category whose criterion E threshold this Run meets: Endangered (EN).");
        expect(await page.getByTestId("quasi-extinction-table").locator("tbody tr").count()).toBe(3);
        // A forged start from the viewer's session is refused.
        const forged = await page.evaluate(async (id) => {
          const csrf = decodeURIComponent(document.cookie.split("; ").find((c) => c.startsWith("sw_csrf="))?.slice("sw_csrf=".length) ?? "");
          const res = await fetch(`/api/v1/life-cycles/${id}/runs`, {
            method: "POST",
            headers: { "Content-Type": "application/json", "X-CSRF-Token": csrf },
            body: JSON.stringify({ kind: "risk", settings: {} }),
          });
          return res.status;
        }, lifeCycleId);
        expect(forged).toBe(403);
      },
      "e2e-risk-viewer-failure.png",
    );
  });

  it("a matrix set draws from life cycles of the Study with the same stages; others are shown greyed with the reason", async () => {
    const wet = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Wet years" }) });
    expect(wet.status).toBe(201);
    const two = threeStageLifeCycle({ name: "Two-stage sketch" });
    const small = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, {
      document: { ...two, stages: two.stages.slice(0, 2), transitions: two.transitions.filter((t) => t.from !== "st_a" && t.to !== "st_a") },
    });
    expect(small.status).toBe(201);
    await withPage(
      owner.user,
      async (page) => {
        await openRisk(page);
        await page.getByLabel("One of several life cycles at random").check();
        await page.getByText("Two-stage sketch — has 2 stages; this one has 3").waitFor();
        expect(await page.getByRole("checkbox", { name: /Two-stage sketch/ }).count()).toBe(0);
        await page.getByRole("checkbox", { name: "Heath site (this life cycle)" }).check();
        await page.getByRole("checkbox", { name: "Wet years" }).check();
        await page.getByLabel("Weight of Heath site (this life cycle)").fill("0.5");
        await page.getByLabel("Weight of Wet years").fill("0.6");
        await page.getByRole("textbox", { name: "Horizon (years)" }).fill("10");
        await page.getByRole("textbox", { name: "Replicates (simulated futures)" }).fill("1000");
        await page.getByRole("button", { name: "Start run" }).click();
        await page.getByText("The weights must sum to 1; they sum to 1.1.").waitFor();
        await page.getByRole("button", { name: "Equal weights" }).click();
        expect(await page.getByLabel("Weight of Wet years").inputValue()).toBe("0.5");
        await expect.poll(() => page.getByText("The weights must sum to 1").count()).toBe(0);
        // Earlier tests' Runs are on the same life cycle: wait for this one to exist, then for its results.
        const listRuns = async () =>
          (await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body as { status: string; settings: { environment: { kind: string; lifeCycleIds: string[]; weights: number[] } } }[];
        const before = (await listRuns()).length;
        await page.getByRole("button", { name: "Start run" }).click();
        await expect.poll(async () => (await listRuns()).length, { timeout: 30_000 }).toBe(before + 1);
        await expect.poll(async () => (await listRuns())[0]!.status, { timeout: 60_000 }).toBe("succeeded");
        await page.getByTestId("risk-results").waitFor({ timeout: 60_000 });
        const environment = (await listRuns())[0]!.settings.environment;
        expect(environment.kind).toBe("matrices");
        expect([...environment.lifeCycleIds].sort()).toEqual([lifeCycleId, wet.body.id as string].sort());
        expect(environment.weights).toEqual([0.5, 0.5]);
        await page.getByText(/Life cycles drawn at random \(2\) · 10 years · 1,000 replicates/).waitFor();
      },
      "e2e-risk-matrices-failure.png",
    );
  });

  it("an editor cancels a long Run", async () => {
    await withPage(
      owner.user,
      async (page) => {
        await openRisk(page);
        await page.getByRole("checkbox", { name: "Vary s_a" }).check();
        await page.getByLabel("Demographic stochasticity").check();
        await page.getByRole("textbox", { name: "Total individuals" }).fill("400");
        await page.getByLabel("Horizon (years)").fill("1000");
        await page.getByLabel("Replicates (simulated futures)").fill("100000");
        await page.getByRole("button", { name: "Start run" }).click();
        await page.getByRole("progressbar", { name: "Progress of the Run" }).waitFor({ timeout: 10_000 });
        await page.getByRole("button", { name: "Cancel run" }).click();
        await page.getByText("Cancelled before it finished: there are no results.").waitFor({ timeout: 10_000 });
        const runs = (await owner.get(`/api/v1/life-cycles/${lifeCycleId}/runs`)).body as { status: string }[];
        expect(runs[0]!.status).toBe("cancelled");
        expect(await page.getByTestId("risk-results").count()).toBe(0);
      },
      "e2e-risk-cancel-failure.png",
    );
  });
});
