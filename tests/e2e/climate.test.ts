// The Climate tab in Debian's Chromium, against a real server: from the Rates
// tab an editor opens a rate's temperature response, picks the
// Gaussian–quadratic form, is stopped by a critical maximum below the optimum
// (the message next to the field), fixes it, attaches the response, gives
// juvenile survival an Arrhenius hazard, and reads λ(T) with the persistence
// window shaded — the window's edges as the server computes them for the
// saved document.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { responseValue, thermalModel } from "../../shared/climate";
import { createRandom } from "../../shared/demography";
import { upgradeLifeCycle } from "../../shared/lifecycle";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";
import { startWorker } from "../helpers/worker";

type Agent = BrowserAgent & { user: { email: string; password: string; name: string; id: string } };

let server: TestServer;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let owner: Agent;
let lifeCycleId: string;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  owner = (await signUpAgent(server, { name: "Clara Climate" })) as Agent;
  const studyId = (await owner.post("/api/v1/studies", { name: "Pond newts" })).body.id as string;
  const created = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Warm pond" }) });
  expect(created.status).toBe(201);
  lifeCycleId = created.body.id as string;
});

afterAll(async () => {
  await browser?.close();
  await server?.close();
});

async function signIn(page: Page, user: { email: string; password: string }) {
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel("E-mail").fill(user.email);
  await page.getByLabel("Password").fill(user.password);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

const parseCelsius = (s: string) => Number(s.replace("−", "-").replace(" °C", ""));

describe("the Climate tab", () => {
  it("an editor attaches thermal responses to two rates and sees λ(T) with the persistence window shaded", async () => {
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    try {
      await signIn(page, owner.user);
      await page.goto(`${server.url}/life-cycles/${lifeCycleId}`);
      await page.getByRole("tab", { name: "Rates" }).click();
      await page.getByRole("button", { name: "Add a temperature response to f →" }).click();
      await page.getByRole("heading", { name: "Response of f" }).waitFor();
      expect(await page.getByRole("tab", { name: "Climate" }).getAttribute("aria-selected")).toBe("true");

      await page.getByLabel("Response form").selectOption("gaussian-quadratic");
      await page.getByLabel(/^Optimum temperature/).fill("21");
      await page.getByLabel(/^Width σ of the rise/).fill("5");
      await page.getByLabel(/^Value at the optimum/).fill("2.4");
      // A critical maximum below the optimum: the message sits under the field, nothing can be attached.
      const ctmax = page.getByLabel(/^Critical thermal maximum/);
      await ctmax.fill("18");
      await page.getByText('The thermal response of "f": the critical maximum (18 °C) must lie above the optimum (21 °C).').waitFor();
      expect(await ctmax.getAttribute("aria-invalid")).toBe("true");
      const attach = page.getByRole("button", { name: "Attach response to f" });
      expect(await attach.isDisabled()).toBe(true);
      await ctmax.fill("31");
      await page.getByText("Peak at 21 °C by the form's optimum formula.").waitFor();
      await page.getByRole("img", { name: /^Preview of f from/ }).waitFor();
      await attach.click();
      await page.getByRole("button", { name: "Save response" }).waitFor();

      // Juvenile survival: the default for a probability under Arrhenius is a hazard with E = 0.65 eV, equal to s_j at 20 °C.
      await page.getByRole("button", { name: /^s_j/ }).click();
      await page.getByRole("heading", { name: "Response of s_j" }).waitFor();
      expect(await page.getByLabel(/^Activation energy E/).inputValue()).toBe("0.65");
      expect(await page.getByRole("radio", { name: /a hazard h\(T\)/ }).isChecked()).toBe(true);
      await page.getByRole("button", { name: "Attach response to s_j" }).click();
      await page.getByRole("button", { name: "Save response" }).waitFor();

      // λ(T) over 0–35 °C with the window (λ ≥ 1) shaded and both edges named.
      const windowText = page.getByTestId("climate-window");
      await page.waitForFunction(() => /–/.test(document.querySelector("[data-testid=climate-window]")?.textContent ?? ""));
      const chart = page.getByRole("img", { name: /^λ from 0 °C to 35 °C, with the temperatures where λ is at least 1 shaded/ });
      await chart.waitFor();
      // The shaded band is drawn (spruce at 14 % opacity).
      await page.waitForFunction(() => [...document.querySelectorAll("svg path")].some((p) => p.getAttribute("fill-opacity") === "0.14"));
      const [lower, upper] = (await windowText.textContent())!.split(" – ").map(parseCelsius);

      // The saved document (autosave) carries both responses; the edges shown are where its λ crosses 1.
      let doc = upgradeLifeCycle((await owner.get(`/api/v1/life-cycles/${lifeCycleId}`)).body.document);
      for (let tries = 0; doc.rates.filter((r) => r.thermal).length < 2 && tries < 50; tries++) {
        await new Promise((r) => setTimeout(r, 200));
        doc = upgradeLifeCycle((await owner.get(`/api/v1/life-cycles/${lifeCycleId}`)).body.document);
      }
      expect(doc.rates.filter((r) => r.thermal).map((r) => [r.name, r.thermal!.form])).toEqual([
        ["s_j", "arrhenius"],
        ["f", "gaussian-quadratic"],
      ]);
      const model = thermalModel(doc);
      // Shown to 4 significant digits: λ crosses 1 within that rounding of each edge.
      for (const edge of [lower!, upper!]) {
        const step = edge >= 10 ? 0.005 : 0.0005;
        expect(Math.sign(model.lambdaAt(edge - step) - 1)).not.toBe(Math.sign(model.lambdaAt(edge + step) - 1));
      }
      await page.screenshot({ path: ".data/climate-tab.png", fullPage: true });
      expect(errors()).toEqual([]);
    } catch (error) {
      await page.screenshot({ path: ".data/climate-failure.png", fullPage: true }).catch(() => undefined);
      throw error;
    } finally {
      await page.close();
      await browser.context.clearCookies();
    }
  });

  it("an editor fits a Brière curve to an uploaded CSV, attaches it, and runs warming replicates with progress", async () => {
    const worker = startWorker(server.databaseUrl);
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    try {
      await signIn(page, owner.user);
      await page.goto(`${server.url}/life-cycles/${lifeCycleId}?tab=climate`);
      await page.getByRole("heading", { name: "Fit a response to measurements" }).waitFor();

      // A CSV with text in a numeric column is refused line by line, before anything is sent.
      await page.getByLabel("Measurements (CSV)").setInputFiles({ name: "bad.csv", mimeType: "text/csv", buffer: Buffer.from("temperature,rate\n10,0.2\n15,lots\n") });
      await page.getByText('Line 3, column 2 (value): "lots" is not a number.').waitFor();

      const truth = { form: "briere", appliesTo: "rate", coefficient: 2e-3, lower: 6, upper: 30 } as const;
      const rng = createRandom(77);
      const rows = Array.from({ length: 16 }, (_, i) => 8 + i * 1.4).map((t) => `${t.toFixed(1)},${(responseValue(truth, t) + 0.02 * rng.normal()).toFixed(5)}`);
      await page.getByLabel("Measurements (CSV)").setInputFiles({ name: "growth.csv", mimeType: "text/csv", buffer: Buffer.from(`temperature,rate\n${rows.join("\n")}\n`) });
      await page.getByLabel("Form", { exact: true }).selectOption("briere");
      await page.getByRole("button", { name: "Fit", exact: true }).click();
      await page.getByText("The fit converged").waitFor();
      const upperRow = page.getByRole("row", { name: /Upper limit T_L/ });
      const [estimate, se] = (await upperRow.getByRole("cell").allTextContents()).map(Number);
      expect(Math.abs(estimate! - 30)).toBeLessThanOrEqual(3 * se!);
      await page.getByRole("img", { name: /with the fitted curve, and the residuals below/ }).waitFor();
      await page.getByLabel("Attach the fitted curve to").selectOption({ label: "s_s" });
      await page.getByRole("button", { name: "Attach", exact: true }).click();
      await page.getByRole("heading", { name: "Response of s_s" }).waitFor();
      expect(await page.getByLabel("Response form").inputValue()).toBe("briere");

      // Warming: a trend from 18 °C at 3 °C per decade leaves the window; replicates run as a Run with progress.
      await page.getByLabel("Baseline (°C)").fill("18");
      await page.getByLabel("Trend (°C per decade)").fill("3");
      await page.getByLabel("Years", { exact: true }).fill("40");
      await page.getByText(/The annual λ first falls below 1 in \d{4}/).waitFor();
      await page.getByRole("img", { name: /^Population size from 2026 to 2066 above the yearly mean temperature/ }).waitFor();
      await page.getByLabel("Replicates", { exact: true }).fill("200");
      const start = page.getByRole("button", { name: "Start replicates" });
      await page.waitForFunction(() => ![...document.querySelectorAll("button")].find((b) => b.textContent === "Start replicates")?.hasAttribute("disabled"), undefined, { timeout: 30_000 });
      await start.click();
      await page.getByTestId("warming-result").waitFor({ timeout: 60_000 });
      expect(await page.getByTestId("warming-result").textContent()).toMatch(/^200 replicates \(seed \d+, SD 0\.8 °C\)/);
      await page.screenshot({ path: ".data/climate-warming.png", fullPage: true });
      expect(errors()).toEqual([]);
    } catch (error) {
      await page.screenshot({ path: ".data/climate-failure-2.png", fullPage: true }).catch(() => undefined);
      throw error;
    } finally {
      await page.close();
      await browser.context.clearCookies();
      await worker.stop();
    }
  });
});
