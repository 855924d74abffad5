// Two people edit one life cycle in two browsers. The second save finds the
// first one and gets a conflict banner naming who saved; nothing is
// overwritten: "Keep mine as a copy" saves the second person's work as a new
// life cycle beside the first person's, and "Reload their version" shows
// theirs.
import { afterAll, beforeAll, expect, it } from "vitest";
import type { Page } from "playwright-core";
import type { LifeCycle } from "../../shared/lifecycle";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { expectSaved, inviteAndSignUp, pageApi, signUp, stage } from "../helpers/editor";
import { startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
let ann: Awaited<ReturnType<typeof launchBrowser>>;
let ben: Awaited<ReturnType<typeof launchBrowser>>;
beforeAll(async () => {
  server = await startTestServer();
  [ann, ben] = await Promise.all([launchBrowser(), launchBrowser()]);
});
afterAll(async () => {
  await ann?.close();
  await ben?.close();
  await server?.close();
});

/** A small invented life cycle: two stages, three arrows. */
const marshDocument: LifeCycle = {
  stagewright: 2,
  name: "Reed marsh voles",
  census: "pre-breeding",
  timeStepUnit: "year",
  stages: [
    { id: "st_young", name: "Young", position: { x: 80, y: 160 } },
    { id: "st_breeder", name: "Breeder", position: { x: 380, y: 160 } },
  ],
  rates: [],
  transitions: [
    { id: "tr_grow", from: "st_young", to: "st_breeder", kind: "growth", rate: 0.3 },
    { id: "tr_stay", from: "st_breeder", to: "st_breeder", kind: "stasis", rate: 0.55 },
    { id: "tr_born", from: "st_breeder", to: "st_young", kind: "reproduction", rate: 1.4 },
  ],
};

async function renameStage(page: Page, from: string, to: string) {
  await stage(page, from).click();
  await page.getByLabel("Stage name").fill(to);
  await stage(page, to).waitFor();
}

async function run(annPage: Page, benPage: Page) {
  const annErrors = watchPageErrors(annPage);
  const benErrors = watchPageErrors(benPage);
  await signUp(annPage, server, "Ann Owner", "ann.owner@example.org");
  await annPage.waitForURL(/\/studies$/);
  const study = await pageApi<{ id: string }>(annPage, "POST", "/studies", { name: "Reed marsh" });
  expect(study.status).toBe(201);
  const created = await pageApi<{ id: string; version: number }>(annPage, "POST", `/studies/${study.body.id}/life-cycles`, { document: marshDocument });
  expect(created.status).toBe(201);
  const id = created.body.id;
  await inviteAndSignUp(annPage, benPage, server, study.body.id, "editor", "Ben Editor", "ben.editor@example.org");

  // Both open version 1.
  for (const page of [annPage, benPage]) {
    await page.goto(`${server.url}/life-cycles/${id}`);
    await page.getByRole("heading", { name: "Reed marsh voles" }).waitFor();
    await expectSaved(page, 1);
  }

  // Ann renames a stage and it is saved as version 2.
  await renameStage(annPage, "Young", "Juvenile");
  await expectSaved(annPage, 2);

  // Ben, still on version 1, adds a stage: his save is refused and the banner says why.
  await benPage.getByRole("button", { name: "Add stage" }).click();
  await benPage.getByLabel("Stage name").fill("Floater");
  const banner = benPage.getByRole("status").filter({ hasText: "Ann Owner saved version 2 of this life cycle while you were editing." });
  await banner.waitFor();
  await benPage.locator('[data-save-status="conflict"]').waitFor();
  await benPage.screenshot({ path: ".data/e2e-editor-conflict.png" });
  // Nothing was overwritten: the server still has Ann's version.
  const during = await pageApi<{ version: number; document: LifeCycle }>(annPage, "GET", `/life-cycles/${id}`);
  expect(during.body.version).toBe(2);
  expect(during.body.document.stages.map((s) => s.name)).toEqual(["Juvenile", "Breeder"]);

  // Ben keeps his work as a copy and is taken to it.
  await benPage.getByRole("button", { name: "Keep mine as a copy" }).click();
  await benPage.waitForURL((url) => url.pathname.startsWith("/life-cycles/") && !url.pathname.endsWith(id));
  await benPage.getByRole("heading", { name: "Reed marsh voles (my copy)" }).waitFor();
  await expectSaved(benPage, 1);
  await stage(benPage, "Floater").waitFor();
  await stage(benPage, "Young").waitFor();

  // Both versions exist: Ann's rename in the original, Ben's new stage in the copy.
  const list = await pageApi<{ id: string; name: string; version: number }[]>(annPage, "GET", `/studies/${study.body.id}/life-cycles`);
  expect(list.body.map((l) => l.name).sort()).toEqual(["Reed marsh voles", "Reed marsh voles (my copy)"]);
  const copyId = list.body.find((l) => l.name.endsWith("(my copy)"))!.id;
  const original = await pageApi<{ version: number; document: LifeCycle }>(annPage, "GET", `/life-cycles/${id}`);
  const copy = await pageApi<{ version: number; document: LifeCycle }>(annPage, "GET", `/life-cycles/${copyId}`);
  expect(original.body.version).toBe(2);
  expect(original.body.document.stages.map((s) => s.name)).toEqual(["Juvenile", "Breeder"]);
  expect(copy.body.document.stages.map((s) => s.name)).toEqual(["Young", "Breeder", "Floater"]);
  expect(copy.body.document.transitions).toEqual(marshDocument.transitions);

  // Second round on the original: Ben's change loses to Ann's again, and he takes hers.
  await benPage.goto(`${server.url}/life-cycles/${id}`);
  await benPage.getByRole("heading", { name: "Reed marsh voles" }).waitFor();
  await expectSaved(benPage, 2);
  await renameStage(annPage, "Breeder", "Adult");
  await expectSaved(annPage, 3);
  await renameStage(benPage, "Juvenile", "Yearling");
  await benPage.getByRole("button", { name: "Reload their version" }).click();
  await expectSaved(benPage, 3);
  await stage(benPage, "Adult").waitFor();
  await stage(benPage, "Juvenile").waitFor();
  expect(await stage(benPage, "Yearling").count()).toBe(0);
  expect(await benPage.getByRole("button", { name: "Keep mine as a copy" }).count()).toBe(0);

  // And Ben can go on editing from Ann's version.
  await renameStage(benPage, "Juvenile", "Yearling");
  await expectSaved(benPage, 4);
  const last = await pageApi<{ document: LifeCycle }>(annPage, "GET", `/life-cycles/${id}`);
  expect(last.body.document.stages.map((s) => s.name)).toEqual(["Yearling", "Adult"]);

  expect(annErrors()).toEqual([]);
  expect(benErrors()).toEqual([]);
}

it("shows a conflict banner to the second of two editors and loses no edit", async () => {
  const annPage = await ann.context.newPage();
  const benPage = await ben.context.newPage();
  try {
    await run(annPage, benPage);
  } catch (error) {
    await annPage.screenshot({ path: ".data/e2e-editor-conflict-ann-failure.png" }).catch(() => undefined);
    await benPage.screenshot({ path: ".data/e2e-editor-conflict-ben-failure.png" }).catch(() => undefined);
    throw error;
  }
});
