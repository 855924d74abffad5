import { afterAll, beforeAll, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUp as signUpThroughPages } from "../helpers/editor";
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

const signUp = (page: Page, name: string, email: string) => signUpThroughPages(page, server, name, email);

it("an owner invites a reviewer, who signs up from the e-mailed link and sees the Study read-only", async () => {
  // The owner signs up, creates a Study and invites a reviewer.
  const ownerPage = await browser.context.newPage();
  const ownerErrors = watchPageErrors(ownerPage);
  await signUp(ownerPage, "Owner Person", "owner.person@example.org");
  await ownerPage.getByRole("button", { name: /new study|create study/i }).first().click();
  await ownerPage.getByLabel("Study name").fill("Kessel Marsh newts");
  await ownerPage.getByRole("button", { name: "Create Study" }).click();
  await ownerPage.getByRole("link", { name: "Kessel Marsh newts" }).click();
  await ownerPage.getByRole("heading", { name: "Kessel Marsh newts" }).waitFor();
  await ownerPage.getByLabel("E-mail").fill("rhea.reviewer@example.org");
  await ownerPage.getByLabel("Role").selectOption("reviewer");
  await ownerPage.getByRole("button", { name: "Invite" }).click();
  await ownerPage.getByText("rhea.reviewer@example.org").waitFor();
  expect(ownerErrors()).toEqual([]);

  // The reviewer (a different browser session) opens the link from the Mail outbox.
  const ctx2 = await launchBrowser();
  try {
    const page = await ctx2.context.newPage();
    const errors = watchPageErrors(page);
    await page.goto(`${server.url}/mail`);
    await page.getByText("invited you to the Study “Kessel Marsh newts”").first().waitFor();
    const link = page.getByRole("link", { name: /\/invitations\// }).first();
    await link.click();
    await page.getByText("Kessel Marsh newts").first().waitFor();
    await page.getByText(/reviewer/i).first().waitFor();
    await page.getByRole("link", { name: /create an account|sign up/i }).first().click();
    await page.getByLabel("Name").fill("Rhea Reviewer");
    await page.getByLabel("E-mail").fill("rhea.reviewer@example.org");
    await page.getByLabel("Password").fill("a long enough password");
    await page.getByRole("button", { name: "Create account" }).click();

    // Lands on the Study, as a reviewer: members visible, owner-only controls absent.
    await page.getByRole("heading", { name: "Kessel Marsh newts" }).waitFor();
    await page.getByText("Owner Person").first().waitFor();
    expect(await page.getByRole("button", { name: "Invite" }).count()).toBe(0);
    expect(await page.getByRole("button", { name: "Archive Study" }).count()).toBe(0);
    expect(await page.getByRole("button", { name: "Remove" }).count()).toBe(0);
    expect(await page.getByRole("button", { name: /new life cycle/i }).count()).toBe(0);
    await page.screenshot({ path: ".data/e2e-reviewer-study.png" });
    expect(errors()).toEqual([]);
  } finally {
    await ctx2.close();
  }
});
