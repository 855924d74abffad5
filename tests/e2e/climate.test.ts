// The Climate tab in Debian's Chromium, against a real server: from the Rates
// tab an editor opens a rate's temperature response, picks the
// Gaussian–quadratic form, is stopped by a critical maximum below the optimum
// (the message next to the field), fixes it, attaches the response, gives
// juvenile survival an Arrhenius hazard, and reads λ(T) with the persistence
// window shaded — the window's edges as the server computes them for the
// saved document.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { thermalModel } from "../../shared/climate";
import { upgradeLifeCycle } from "../../shared/lifecycle";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type BrowserAgent, type TestServer } from "../helpers/server";

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
    }
  });
});
