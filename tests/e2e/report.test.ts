// The report in Debian's Chromium: a member opens a life cycle, reads λ in
// the editor's header, opens the Report, finds the same λ, the cautions and
// the figures, switches to a snapshot, and downloads the PDF, whose text
// holds the λ shown on screen. A life cycle with thermal responses gets a
// Climate section whose persistence window reads as the Climate tab shows
// it; one without gets none. The API page lists the routes from the OpenAPI
// document.
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { demoLikeClimateLifeCycle } from "../factories/climate";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { pdfText } from "../helpers/pdf";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let owner: Awaited<ReturnType<typeof signUpAgent>>;
let lifeCycleId: string;
let snapshotId: string;
let climateId: string;

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  owner = await signUpAgent(server, { name: "Prita Printer" });
  const studyId = (await owner.post("/api/v1/studies", { name: "Moorland toads" })).body.id as string;
  lifeCycleId = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "North pond" }) })).body.id as string;
  snapshotId = (await owner.post(`/api/v1/life-cycles/${lifeCycleId}/snapshots`, { message: "for the review panel" })).body.id as string;
  climateId = (await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: demoLikeClimateLifeCycle("Warm pond") })).body.id as string;
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

describe("report page", () => {
  it("shows the λ of the editor, prints on chosen paper and downloads a PDF with the same λ", async () => {
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    try {
      await page.goto(`${server.url}/sign-in`);
      await page.getByLabel("E-mail").fill(owner.user.email);
      await page.getByLabel("Password").fill(owner.user.password);
      await page.getByRole("button", { name: "Sign in" }).click();
      await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
      await page.goto(`${server.url}/life-cycles/${lifeCycleId}`);
      const header = page.locator("output[data-lambda]");
      await expect.poll(() => header.innerText(), { timeout: 20_000 }).toMatch(/^\d\.\d{4}$/);
      const onScreen = (await header.innerText()).trim();

      await page.getByRole("link", { name: "Report" }).click();
      await page.waitForURL(/\/report$/);
      await expect.poll(() => page.getByTestId("report-lambda").innerText(), { timeout: 20_000 }).toBe(`λ = ${onScreen}`);
      await expect.poll(() => page.getByRole("heading", { level: 1, name: "North pond" }).count()).toBe(1);
      expect(await page.getByRole("complementary", { name: "Cautions" }).innerText()).toContain("Models are only as good as their data.");
      expect(await page.getByRole("img", { name: /Life-cycle diagram of North pond/ }).count()).toBe(1);
      expect(await page.getByRole("img", { name: /Heatmap of the elasticities/ }).count()).toBe(1);
      expect(await page.getByTestId("report-source").innerText()).toMatch(/identical to snapshot #1/);
      // No thermal responses: no Climate section, not even its heading.
      expect(await page.getByRole("heading", { level: 2, name: "Climate", exact: true }).count()).toBe(0);

      // The report of the snapshot.
      await page.getByLabel("State").selectOption(snapshotId);
      await expect.poll(() => page.getByTestId("report-source").innerText()).toContain(`Snapshot #1 (${snapshotId})`);
      expect(page.url()).toContain(`snapshot=${snapshotId}`);

      // Letter paper sets the printed page size.
      await page.getByLabel("Paper").selectOption("letter");
      const styles = () => page.evaluate(() => [...document.querySelectorAll("style")].map((s) => s.textContent ?? "").join("\n"));
      await expect.poll(styles).toContain("@page { size: letter; margin: 18mm; }");

      const [download] = await Promise.all([page.waitForEvent("download"), page.getByRole("button", { name: "Download PDF" }).click()]);
      expect(download.suggestedFilename()).toBe("north-pond-report.pdf");
      const path = await download.path();
      const bytes = await import("node:fs").then((fs) => fs.readFileSync(path!));
      const { text } = await pdfText(bytes);
      expect(text).toContain(`λ = ${onScreen}`);
      expect(text).toContain(snapshotId);
      expect(bytes.toString("latin1")).toMatch(/\/MediaBox \[0 0 612 792\]/);
      expect(errors()).toEqual([]);
    } finally {
      await page.close();
    }
  });

  it("gives a life cycle with thermal responses a Climate section whose window reads as the Climate tab's", async () => {
    const page = await browser.context.newPage();
    const errors = watchPageErrors(page);
    try {
      // Signed in already when the first test ran (the browser context keeps its cookies); otherwise sign in here.
      await page.goto(`${server.url}/life-cycles/${climateId}?tab=climate`);
      await page.waitForLoadState("networkidle");
      if (new URL(page.url()).pathname.startsWith("/sign-in")) {
        await page.getByLabel("E-mail").fill(owner.user.email);
        await page.getByLabel("Password").fill(owner.user.password);
        await page.getByRole("button", { name: "Sign in" }).click();
        await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
      }
      const tabWindow = page.getByTestId("climate-window");
      await expect.poll(() => tabWindow.innerText(), { timeout: 20_000 }).toMatch(/°C – .*°C/);
      const onTab = (await tabWindow.innerText()).trim();

      await page.getByRole("link", { name: "Report" }).click();
      await page.waitForURL(/\/report$/);
      const climate = page.getByRole("region", { name: "Climate", exact: true });
      await expect.poll(() => climate.count(), { timeout: 20_000 }).toBe(1);
      expect(await page.getByTestId("report-climate-findings").innerText()).toContain(`Persistence window (λ ≥ 1): ${onTab}.`);
      expect(await climate.getByRole("img", { name: /persistence window \(λ ≥ 1\) shaded/ }).count()).toBe(1);
      expect(await climate.getByRole("table", { name: "Thermal responses of the vital rates" }).innerText()).toContain("Boltzmann–Arrhenius");
      expect(await climate.getByRole("region", { name: "Cautions for these Climate results" }).innerText()).toContain("extrapolation");
      expect(errors()).toEqual([]);
    } finally {
      await page.close();
    }
  });

  it("the API page lists the routes with who may call them", async () => {
    const page = await browser.context.newPage();
    try {
      await page.goto(`${server.url}/api-guide`);
      await expect.poll(() => page.getByRole("heading", { level: 2, name: "Reports" }).count(), { timeout: 20_000 }).toBe(1);
      const report = page.getByRole("listitem").filter({ hasText: "/api/v1/life-cycles/{lifeCycleId}/report.pdf" });
      expect(await report.innerText()).toMatch(/Who: Study members · token scope: read/);
      await report.getByText("Parameters and body").click();
      expect(await report.innerText()).toContain("?paper=");
    } finally {
      await page.close();
    }
  });
});
