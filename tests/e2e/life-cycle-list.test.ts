// A Study's life cycles in Debian's Chromium: starting one from a template,
// from a pasted CSV matrix (bad input explained next to the field, nothing
// saved) and from a Stagewright file; duplicating, deleting with a
// confirmation, and restoring from "Recently deleted".
import { afterAll, beforeAll, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { analyzeMatrix } from "../../shared/demography";
import type { LifeCycle } from "../../shared/lifecycle";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { expectLambda, expectSaved, pageApi, signUp } from "../helpers/editor";
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

async function run(page: Page) {
  const errors = watchPageErrors(page);
  await signUp(page, server, "Lena Lister", "lena.lister@example.org");
  await page.waitForURL(/\/studies$/);
  const study = await pageApi<{ id: string }>(page, "POST", "/studies", { name: "Cliff swifts" });
  const studyUrl = `${server.url}/studies/${study.body.id}`;
  const count = async () => (await pageApi<unknown[]>(page, "GET", `/studies/${study.body.id}/life-cycles`)).body.length;
  const openDialog = async (tab: string) => {
    await page.goto(studyUrl);
    await page.getByRole("button", { name: "From a template or file…" }).click();
    await page.getByRole("dialog").getByRole("tab", { name: tab }).click();
  };

  // From a template: four stages in a chain with stasis, growth and reproduction.
  await openDialog("Template");
  await page.getByLabel("Number of stages").fill("0");
  await page.getByText("Give a whole number from 1 to 500.").waitFor();
  await page.getByLabel("Number of stages").fill("4");
  await page.getByRole("button", { name: "Create from template" }).click();
  await page.waitForURL(/\/life-cycles\//);
  await page.getByRole("heading", { name: "Stage-classified life cycle (4 stages)" }).waitFor();
  await expect.poll(() => page.locator(".react-flow__node").count()).toBe(4);
  expect(await page.locator(".react-flow__edge").count()).toBe(8);
  expect(await count()).toBe(1);

  // From a CSV matrix: each kind of bad input is explained beside the field and nothing is created.
  await openDialog("Matrix (CSV)");
  const csv = page.getByLabel("Projection matrix (CSV)");
  const create = page.getByRole("button", { name: "Create from matrix" });
  await csv.fill("0,1.2\n0.4,x");
  await page.getByText('Line 2, cell 2: "x" is not a number.').waitFor();
  expect(await create.isDisabled()).toBe(true);
  await csv.fill("0,1.2\n-0.4,0.8");
  await page.getByText("-0.4 is negative; matrix entries are rates ≥ 0.").waitFor();
  await page.screenshot({ path: ".data/e2e-life-cycle-csv.png" });
  await csv.fill("0,1,2\n0.5,0,0\n0,0.5,0\n0,0,0.5");
  await page.getByText("The matrix has 4 rows and 3 columns; a projection matrix is square.").waitFor();
  await csv.fill(`${Array.from({ length: 501 }, () => "0").join(",")}\n`);
  await page.getByText("Stagewright takes at most 500 stages").waitFor();
  expect(await create.isDisabled()).toBe(true);
  expect(await count()).toBe(1);

  const matrix = [
    [0, 1.1, 2.4],
    [0.3, 0.45, 0],
    [0, 0.35, 0.8],
  ];
  await csv.fill([",Nestling,Yearling,Breeder", ...["Nestling", "Yearling", "Breeder"].map((n, i) => [n, ...matrix[i]!].join(","))].join("\n"));
  await page.getByText("Reads as a 3 × 3 matrix with 6 non-zero entries; stages Nestling, Yearling, Breeder.").waitFor();
  await page.getByLabel("The first row is reproduction").check();
  await page.getByLabel("Name (optional)").fill("Swifts from the 2025 matrix");
  await create.click();
  await page.waitForURL(/\/life-cycles\//);
  await page.getByRole("heading", { name: "Swifts from the 2025 matrix" }).waitFor();
  await expectLambda(page, analyzeMatrix({ A: matrix }).lambda.toFixed(4));
  // The first row became reproduction arrows (dashed), the rest survival.
  const dashed = await page.locator(".react-flow__edge-path").evaluateAll((paths) => paths.filter((p) => getComputedStyle(p).strokeDasharray !== "none").length);
  expect(dashed).toBe(2);
  expect(await count()).toBe(2);
  const matrixLifeCycle = new URL(page.url()).pathname;

  // From a Stagewright file: a file that is not one is refused with the reason; a good one opens.
  await openDialog("Stagewright file");
  const file = page.getByLabel("Stagewright life-cycle file (.json)");
  await file.setInputFiles({ name: "notes.json", mimeType: "application/json", buffer: Buffer.from(JSON.stringify({ name: "No version" })) });
  await page.getByText('the "stagewright" format version field is missing').waitFor();
  const saved = await pageApi<{ document: LifeCycle }>(page, "GET", matrixLifeCycle);
  expect(saved.status).toBe(200);
  const fromFile: LifeCycle = { ...saved.body.document, name: "Swifts, from a file" };
  await file.setInputFiles({ name: "swifts.json", mimeType: "application/json", buffer: Buffer.from(JSON.stringify(fromFile)) });
  await page.getByText("“Swifts, from a file”: 3 stages, 6 arrows, 0 vital rates.").waitFor();
  await page.getByRole("button", { name: "Create from file" }).click();
  await page.getByRole("heading", { name: "Swifts, from a file" }).waitFor();
  await expectSaved(page, 1);
  expect(await count()).toBe(3);

  // Duplicate, delete (after confirming) and restore from the list.
  await page.goto(studyUrl);
  await page.getByRole("button", { name: "Duplicate “Swifts, from a file”" }).click();
  await page.getByText("Duplicated “Swifts, from a file” as “Swifts, from a file (copy)”.").waitFor();
  await page.getByRole("link", { name: "Swifts, from a file (copy)" }).first().waitFor();
  expect(await count()).toBe(4);

  await page.getByRole("button", { name: "Delete “Swifts, from a file (copy)”" }).click();
  const confirm = page.getByRole("dialog", { name: "Delete “Swifts, from a file (copy)”?" });
  await confirm.getByRole("button", { name: "Cancel" }).click();
  expect(await count()).toBe(4);
  await page.getByRole("button", { name: "Delete “Swifts, from a file (copy)”" }).click();
  await confirm.getByRole("button", { name: "Delete life cycle" }).click();
  await page.getByText("Deleted “Swifts, from a file (copy)”.").waitFor();
  expect(await count()).toBe(3);
  await page.getByRole("button", { name: "Recently deleted (1)" }).click();
  await page.screenshot({ path: ".data/e2e-life-cycle-list.png", fullPage: true });
  await page.getByRole("button", { name: "Restore “Swifts, from a file (copy)”" }).click();
  await page.getByText("Restored “Swifts, from a file (copy)”.").waitFor();
  expect(await count()).toBe(4);
  expect(await page.getByRole("button", { name: /Recently deleted/ }).count()).toBe(0);
  expect(errors()).toEqual([]);
}

it("creates life cycles from a template, a CSV matrix and a file, and duplicates, deletes and restores them", async () => {
  const page = await browser.context.newPage();
  try {
    await run(page);
  } catch (error) {
    await page.screenshot({ path: ".data/e2e-life-cycle-list-failure.png", fullPage: true }).catch(() => undefined);
    throw error;
  }
});
