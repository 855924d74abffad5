// Field data in Debian's Chromium, the way a new user works: open the Study's
// Field data, upload a CSV of stage fates, choose its columns, see the row-level
// report for a broken file (nothing stored), import a good one, read the
// estimated matrix and start a life cycle from it, whose λ matches.
import { afterAll, beforeAll, expect, it } from "vitest";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { expectLambda, pageApi, signUp } from "../helpers/editor";
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

// Two stages: of ten juveniles 3 die, 4 stay, 3 mature; of five adults 1 dies, 4 stay; adults leave 2, 3, 1, 4, 0 young.
// Pre-breeding census: A = [[0.4, 2], [0.3, 0.8]], λ = 1.4 exactly.
const GOOD = [
  "tag;season;class;class next;young",
  ...["dead", "dead", "dead", "juvenile", "juvenile", "juvenile", "juvenile", "adult", "adult", "adult"].map((f, k) => `j${k + 1};2021;juvenile;${f};0`),
  ...[["dead", 2], ["adult", 3], ["adult", 1], ["adult", 4], ["adult", 0]].map(([f, o], k) => `a${k + 1};2021;adult;${f};${o}`),
].join("\n");
const BROKEN = GOOD.replace("j2;2021", "j1;2021").replace("a3;2021;adult;adult;1", "a3;2021;adult;adult;one");

it("uploads stage fates, reports a broken file, imports a good one and starts a life cycle from it", async () => {
  const page = await browser.context.newPage();
  const errors = watchPageErrors(page);
  await signUp(page, server, "Fenna Fieldwork", "fenna.fieldwork@example.org");
  await page.waitForURL(/\/studies$/);
  const study = await pageApi<{ id: string }>(page, "POST", "/studies", { name: "Pond survey" });
  await page.goto(`${server.url}/studies/${study.body.id}`);
  await page.getByRole("link", { name: "Open Field data and upload" }).click();
  await page.getByRole("heading", { name: "Field data", level: 1 }).waitFor();
  await page.getByText("No field data yet.").waitFor();
  await page.getByRole("button", { name: "Upload a CSV file" }).click();
  await page.getByText("at most 20 MB and 500,000 rows").waitFor();

  // The broken file: semicolons are detected, the first rows shown, the columns chosen by hand.
  await page.getByLabel("Stage fates of marked individuals").check();
  await page.getByLabel("CSV file").setInputFiles({ name: "pond-broken.csv", mimeType: "text/csv", buffer: Buffer.from(BROKEN) });
  await page.getByText("Read as “;”-separated").waitFor();
  await page.getByRole("cell", { name: "j10" }).waitFor();
  await page.getByLabel("Individual id").selectOption("tag");
  await page.getByLabel("Year", { exact: true }).selectOption("season");
  await page.getByLabel("Stage", { exact: true }).selectOption("class");
  await page.getByLabel("Fate", { exact: true }).selectOption("class next");
  await page.getByLabel("Offspring (optional)").selectOption("young");
  await page.getByLabel("Stages in life-cycle order (optional)").fill("juvenile, adult");
  await page.getByRole("button", { name: "Check the whole file" }).click();
  await page.getByText("2 problems: nothing was stored").waitFor();
  await page.getByRole("cell", { name: "Individual “j1” appears twice in 2021 (also on line 2)." }).waitFor();
  await page.getByRole("cell", { name: "“one” is not a number." }).waitFor();
  await page.screenshot({ path: ".data/e2e-field-data-report.png", fullPage: true });
  await page.getByRole("button", { name: "Import" }).click();
  await page.getByText("2 problems: nothing was stored").waitFor();
  expect((await pageApi<unknown[]>(page, "GET", `/studies/${study.body.id}/datasets`)).body).toHaveLength(0);

  // The good file with the same columns: imported, then its analysis opens.
  await page.getByLabel("CSV file").setInputFiles({ name: "pond-2021.csv", mimeType: "text/csv", buffer: Buffer.from(GOOD) });
  await page.getByLabel("Dataset name").fill("Pond marks 2021");
  await page.getByLabel("Individual id").selectOption("tag");
  await page.getByLabel("Year", { exact: true }).selectOption("season");
  await page.getByLabel("Stage", { exact: true }).selectOption("class");
  await page.getByLabel("Fate", { exact: true }).selectOption("class next");
  await page.getByLabel("Offspring (optional)").selectOption("young");
  await page.getByLabel("Stages in life-cycle order (optional)").fill("juvenile, adult");
  await page.getByRole("button", { name: "Import" }).click();
  await page.waitForURL(/\/datasets\//);
  await page.getByRole("heading", { name: "Pond marks 2021" }).waitFor();
  await page.getByRole("heading", { name: "λ = 1.4000" }).waitFor();
  await page.getByText("n = 10").waitFor();
  await page.getByText("3 of 10").first().waitFor();
  await page.screenshot({ path: ".data/e2e-field-data-matrix.png", fullPage: true });

  // Start a life cycle: its λ is the estimate's, and a rate carries k of n and the dataset as source.
  await page.getByLabel("Life-cycle name").fill("Pond newts from marks");
  await page.getByRole("button", { name: "Start a life cycle" }).click();
  await page.waitForURL(/\/life-cycles\//);
  await page.getByRole("heading", { name: "Pond newts from marks" }).waitFor();
  await expectLambda(page, "1.4000");
  const id = page.url().split("/").at(-1)!;
  const lc = await pageApi<{ document: { rates: { name: string; counts?: { k: number; n: number }; source?: string }[] } }>(page, "GET", `/life-cycles/${id}`);
  const p = lc.body.document.rates.find((r) => r.name === "p_adult_juvenile")!;
  expect(p.counts).toEqual({ k: 3, n: 10 });
  expect(p.source).toContain("Pond marks 2021");
  expect(errors()).toEqual([]);
  await page.close();
});
