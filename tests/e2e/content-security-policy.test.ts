// The built client under the server's Content-Security-Policy (no inline or
// evaluated script allowed): a person signs up through the pages, opens a
// Study and a life cycle, and visits every tab of the editor (whatever tabs
// exist), while the page records every policy violation it meets.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { afterAll, beforeAll, expect, it } from "vitest";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { pageApi, signUp } from "../helpers/editor";
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

it("no page breaks the policy: sign-up, Studies, a Study, and every tab of the editor", async () => {
  const page = await browser.context.newPage();
  const errors = watchPageErrors(page);
  // Recorded in the page from its first script on, for every document it loads.
  await page.addInitScript(() => {
    const w = window as unknown as { __cspViolations: string[] };
    w.__cspViolations = [];
    document.addEventListener("securitypolicyviolation", (e) => w.__cspViolations.push(`${e.violatedDirective} blocked ${e.blockedURI || "inline"} at ${e.sourceFile}:${e.lineNumber}`));
  });
  const violations: string[] = [];
  const collect = async () => violations.push(...(await page.evaluate(() => (window as unknown as { __cspViolations: string[] }).__cspViolations.splice(0))));
  page.on("console", (m) => {
    if (/Content Security Policy/i.test(m.text())) violations.push(`console: ${m.text()}`);
  });
  const shots = fs.mkdtempSync(path.join(os.tmpdir(), "sw-csp-"));

  await page.goto(`${server.url}/sign-up`);
  await collect();
  await signUp(page, server, "Cass Policy", "cass.policy@example.org");
  await collect();
  const study = await pageApi<{ id: string }>(page, "POST", "/studies", { name: "Policy Study" });
  const lc = await pageApi<{ id: string }>(page, "POST", `/studies/${study.body.id}/life-cycles`, { document: threeStageLifeCycle() });
  expect(lc.status).toBe(201);
  await page.goto(`${server.url}/studies/${study.body.id}`);
  await page.getByRole("heading", { name: "Policy Study" }).waitFor();
  await collect();

  await page.goto(`${server.url}/life-cycles/${lc.body.id}`);
  const tabs = page.getByRole("tablist", { name: "Life-cycle editor" }).getByRole("tab");
  await tabs.first().waitFor();
  const names = await tabs.allTextContents();
  expect(names.length).toBeGreaterThanOrEqual(4);
  for (const name of names) {
    await tabs.filter({ hasText: name }).first().click();
    await page.getByRole("tab", { name, selected: true }).waitFor();
    // Let lazy chunks, charts and the live analysis settle.
    await page.waitForLoadState("networkidle");
    await page.waitForTimeout(300);
    await collect();
  }
  await page.screenshot({ path: path.join(shots, "last-tab.png") });
  expect(violations).toEqual([]);
  expect(errors()).toEqual([]);

  // Control: an inline script added to the page is blocked, and the watch above sees it.
  const ran = await page.evaluate(async () => {
    const s = document.createElement("script");
    s.textContent = "window.__inlineRan = true";
    document.head.append(s);
    await new Promise((r) => setTimeout(r, 100));
    return (window as unknown as { __inlineRan?: boolean }).__inlineRan ?? false;
  });
  expect(ran).toBe(false);
  await collect();
  expect(violations.some((v) => v.startsWith("script-src"))).toBe(true);
});
