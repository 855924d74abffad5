// The life-cycle editor in Debian's Chromium: an editor builds a three-stage
// life cycle from nothing with the mouse (stages, arrows dragged between
// stage knobs, loops) and the keyboard, reads λ in the header against the
// numerical core, undoes and redoes, and the work is saved. A viewer of the
// same Study sees it without editing controls, and a forged save from the
// viewer's session is refused.
import { afterAll, beforeAll, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { analyzeMatrix } from "../../shared/demography";
import type { LifeCycle } from "../../shared/lifecycle";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { drawArrow, expectLambda, expectSaved, inviteAndSignUp, pageApi, signUp, stage } from "../helpers/editor";
import { startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

/** λ of a matrix (rows: stage at t+1, columns: stage at t) as the editor shows it. */
const lambdaOf = (A: number[][]) => analyzeMatrix({ A }).lambda.toFixed(4);

it("builds a three-stage life cycle with mouse and keyboard, shows λ, undoes and redoes, and keeps viewers read-only", async () => {
  const page = await browser.context.newPage();
  try {
    await buildAndCheck(page);
  } catch (error) {
    await page.screenshot({ path: ".data/e2e-editor-diagram-failure.png" }).catch(() => undefined);
    throw error;
  }
});

async function buildAndCheck(page: Page) {
  const errors = watchPageErrors(page);
  await signUp(page, server, "Ines Editor", "ines.editor@example.org");
  await page.getByRole("button", { name: /new study|create study/i }).first().click();
  await page.getByLabel("Study name").fill("Lowland toads");
  await page.getByRole("button", { name: "Create Study" }).click();
  await page.getByRole("link", { name: "Lowland toads" }).click();
  await page.getByRole("heading", { name: "Lowland toads" }).waitFor();
  const studyId = new URL(page.url()).pathname.split("/").at(-1)!;

  // A blank life cycle opens in the editor.
  await page.getByRole("button", { name: "New life cycle" }).click();
  await page.waitForURL(/\/life-cycles\/[0-9a-f-]+$/);
  const lifeCycleId = new URL(page.url()).pathname.split("/").at(-1)!;
  await page.getByRole("heading", { name: "Untitled life cycle" }).waitFor();
  await expectSaved(page, 1);
  expect(await page.locator('[data-lambda-state="empty"]').count()).toBe(1);

  // Three stages, each named in the inspector as it appears.
  for (const name of ["Juvenile", "Subadult", "Adult"]) {
    await page.getByRole("button", { name: "Add stage" }).click();
    const field = page.getByLabel("Stage name");
    await expect.poll(() => field.evaluate((el) => el === document.activeElement)).toBe(true);
    await field.fill(name);
    await stage(page, name).waitFor();
  }
  await page.getByRole("button", { name: "Arrange automatically" }).click();
  await page.getByRole("button", { name: "Fit to view" }).click();
  await page.waitForTimeout(400); // the fit animates

  // Arrows by dragging from one stage's knob to another; loops by dropping back on the stage.
  const setRate = async (rate: string) => {
    await page.getByLabel("Rate", { exact: true }).fill(rate);
    await expect.poll(() => page.getByLabel("Rate", { exact: true }).getAttribute("aria-invalid")).toBeNull();
  };
  await drawArrow(page, "Juvenile", "Subadult");
  await expect.poll(() => page.getByRole("heading", { name: "Growth arrow: Juvenile → Subadult" }).count()).toBe(1);
  await setRate("0.35");
  await drawArrow(page, "Subadult", "Subadult");
  await page.getByRole("heading", { name: "Stasis arrow: Subadult ↺" }).waitFor();
  await setRate("0.4");
  await drawArrow(page, "Subadult", "Adult");
  await page.getByRole("heading", { name: "Growth arrow: Subadult → Adult" }).waitFor();
  await setRate("0.3");
  await drawArrow(page, "Adult", "Juvenile");
  await page.getByRole("heading", { name: "Growth arrow: Adult → Juvenile" }).waitFor();
  await page.getByLabel("Kind").selectOption("reproduction");
  await page.getByRole("heading", { name: "Reproduction arrow: Adult → Juvenile" }).waitFor();
  await setRate("1.6");
  await drawArrow(page, "Subadult", "Juvenile");
  await page.getByLabel("Kind").selectOption("reproduction");
  await setRate("0.5");

  await page.getByRole("button", { name: "Arrange automatically" }).click();
  await page.waitForTimeout(400);

  // A formula naming an unknown vital rate is explained next to the field; the page and λ stay.
  await page.getByLabel("Rate", { exact: true }).fill("0.5 * q");
  await page.getByText('Unknown vital rate "q"').waitFor();
  await setRate("0.5");

  // The last stasis loop, with the keyboard: Enter on the focused stage opens it in the inspector.
  await stage(page, "Adult").focus();
  await page.keyboard.press("Enter");
  await expect.poll(() => page.getByLabel("Stage name").evaluate((el) => el === document.activeElement)).toBe(true);
  await page.getByRole("button", { name: "Add stasis", exact: true }).click();
  await page.getByRole("heading", { name: "Stasis arrow: Adult ↺" }).waitFor();
  await setRate("0.85");

  const full = [
    [0, 0.5, 1.6],
    [0.35, 0.4, 0],
    [0, 0.3, 0.85],
  ];
  const withoutAdultStasis = [
    [0, 0.5, 1.6],
    [0.35, 0.4, 0],
    [0, 0.3, 0],
  ];
  expect(lambdaOf(full)).not.toBe(lambdaOf(withoutAdultStasis));
  await expectLambda(page, lambdaOf(full));
  expect(await page.locator(".react-flow__edge").count()).toBe(6);
  // Reproduction arrows differ in dash as well as colour.
  const dashes = await page.locator(".react-flow__edge-path").evaluateAll((paths) => paths.map((p) => getComputedStyle(p).strokeDasharray));
  expect(dashes.filter((d) => d !== "none")).toHaveLength(2);
  await page.screenshot({ path: ".data/e2e-editor-diagram.png" });

  // Undo and redo, from the keyboard (outside text fields) and with the buttons.
  await page.getByRole("heading", { name: "Untitled life cycle" }).click();
  await page.keyboard.press("Control+z");
  await expectLambda(page, lambdaOf(withoutAdultStasis));
  await page.keyboard.press("Control+Shift+z");
  await expectLambda(page, lambdaOf(full));
  await page.getByRole("button", { name: "Undo" }).click();
  await expectLambda(page, lambdaOf(withoutAdultStasis));
  await page.getByRole("button", { name: "Redo" }).click();
  await expectLambda(page, lambdaOf(full));

  // Tab moves between stages; Delete removes the focused one with its arrows; undo brings all back.
  await stage(page, "Juvenile").focus();
  await page.keyboard.press("Tab");
  expect(await page.evaluate(() => document.activeElement?.getAttribute("aria-label"))).toBe("Stage Subadult");
  await page.keyboard.press("Delete");
  await expect.poll(() => stage(page, "Subadult").count()).toBe(0);
  expect(await page.locator(".react-flow__edge").count()).toBe(2);
  await page.keyboard.press("Control+z");
  await stage(page, "Subadult").waitFor();
  expect(await page.locator(".react-flow__edge").count()).toBe(6);
  await expectLambda(page, lambdaOf(full));

  // Dragging a stage moves it, and its new place is part of the saved document.
  const before = await stage(page, "Adult").boundingBox();
  await page.mouse.move(before!.x + 30, before!.y + 15);
  await page.mouse.down();
  await page.mouse.move(before!.x + 30, before!.y + 135, { steps: 10 });
  await page.mouse.up();

  await page.getByRole("button", { name: "Rename" }).click();
  await page.getByLabel("Life-cycle name").fill("Lowland toads, pond 3");
  await page.getByRole("button", { name: "Save name" }).click();
  await page.getByRole("heading", { name: "Lowland toads, pond 3" }).waitFor();
  await expectSaved(page);

  const saved = await pageApi<{ version: number; document: LifeCycle }>(page, "GET", `/life-cycles/${lifeCycleId}`);
  expect(saved.status).toBe(200);
  const doc = saved.body.document;
  expect(doc.name).toBe("Lowland toads, pond 3");
  expect(doc.stages.map((s) => s.name)).toEqual(["Juvenile", "Subadult", "Adult"]);
  const byName = (n: string) => doc.stages.find((s) => s.name === n)!.id;
  const arrows = doc.transitions.map((t) => [doc.stages.find((s) => s.id === t.from)!.name, doc.stages.find((s) => s.id === t.to)!.name, t.kind, t.rate]);
  expect(arrows).toEqual(
    expect.arrayContaining([
      ["Juvenile", "Subadult", "growth", 0.35],
      ["Subadult", "Subadult", "stasis", 0.4],
      ["Subadult", "Adult", "growth", 0.3],
      ["Adult", "Juvenile", "reproduction", 1.6],
      ["Subadult", "Juvenile", "reproduction", 0.5],
      ["Adult", "Adult", "stasis", 0.85],
    ]),
  );
  expect(arrows).toHaveLength(6);
  const adultBefore = doc.stages.find((s) => s.id === byName("Adult"))!.position;
  const juvenile = doc.stages.find((s) => s.id === byName("Juvenile"))!.position;
  expect(Math.abs(adultBefore.y - juvenile.y)).toBeGreaterThan(60);

  // The saved work comes back after a reload, with the same λ.
  await page.reload();
  await page.getByRole("heading", { name: "Lowland toads, pond 3" }).waitFor();
  await expectLambda(page, lambdaOf(full));
  await expectSaved(page, saved.body.version);
  expect(errors()).toEqual([]);

  // A viewer of the Study: the same page and numbers, no editing controls.
  const viewerBrowser = await launchBrowser();
  try {
    const viewer = await viewerBrowser.context.newPage();
    const viewerErrors = watchPageErrors(viewer);
    await inviteAndSignUp(page, viewer, server, studyId, "viewer", "Vera Viewer", "vera.viewer@example.org");
    await viewer.goto(`${server.url}/life-cycles/${lifeCycleId}`);
    await viewer.getByRole("heading", { name: "Lowland toads, pond 3" }).waitFor();
    await expectLambda(viewer, lambdaOf(full));
    await viewer.getByText("Read only · Viewer").waitFor();
    await stage(viewer, "Adult").waitFor();
    for (const label of ["Add stage", "Arrange automatically", "Undo", "Redo", "Rename"]) {
      expect(await viewer.getByRole("button", { name: label }).count(), label).toBe(0);
    }
    expect(await viewer.locator(".sw-stage-source").count()).toBe(0);
    expect(await viewer.locator(".react-flow__edge").count()).toBe(6);
    await stage(viewer, "Adult").click();
    await viewer.getByRole("heading", { name: "Stage: Adult" }).waitFor();
    expect(await viewer.getByLabel("Stage name").count()).toBe(0);
    expect(await viewer.getByRole("button", { name: "Delete stage" }).count()).toBe(0);
    await viewer.screenshot({ path: ".data/e2e-editor-viewer.png" });

    // A save forged from the viewer's own session (cookie and CSRF token) is refused.
    const forged = await pageApi<{ error: { code: string } }>(viewer, "PUT", `/life-cycles/${lifeCycleId}`, {
      version: saved.body.version,
      document: { ...doc, name: "Changed by a viewer" },
    });
    expect(forged.status).toBe(403);
    expect(forged.body.error.code).toBe("forbidden");
    const after = await pageApi<{ version: number; document: LifeCycle }>(page, "GET", `/life-cycles/${lifeCycleId}`);
    expect(after.body.version).toBe(saved.body.version);
    expect(after.body.document.name).toBe("Lowland toads, pond 3");
    expect(viewerErrors()).toEqual([]);
  } catch (error) {
    for (const p of viewerBrowser.context.pages()) await p.screenshot({ path: ".data/e2e-editor-viewer-failure.png" }).catch(() => undefined);
    throw error;
  } finally {
    await viewerBrowser.close();
  }
}
