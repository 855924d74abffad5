// Shared steps of the editor's browser tests: signing up, calling the API
// from a signed-in page (session cookie and CSRF header, as the client does),
// drawing on the diagram with the mouse, and reading λ.
import { expect } from "vitest";
import type { Page } from "playwright-core";
import { signUpToken, type TestServer } from "./server";

/** Signs up through the pages as a person does: the form, then the link e-mailed to finish (the Studies page follows). */
export async function signUp(page: Page, server: TestServer, name: string, email: string, path = "/sign-up") {
  await page.goto(`${server.url}${path}`);
  await page.getByLabel("Name").fill(name);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("a long enough password");
  await page.getByRole("button", { name: "Create account" }).click();
  await page.getByText("One more step").waitFor();
  await page.goto(`${server.url}/sign-up/confirm?token=${await signUpToken(server, email.toLowerCase())}`);
  await page.getByRole("button", { name: "Create my account" }).click();
  await page.waitForURL(/\/studies$/);
}

/** A JSON request from the page's own session; returns the status and the parsed body. */
export async function pageApi<T = unknown>(page: Page, method: string, path: string, body?: unknown): Promise<{ status: number; body: T }> {
  return page.evaluate(
    async ({ method, path, body }) => {
      const csrf = decodeURIComponent(document.cookie.split("; ").find((c) => c.startsWith("sw_csrf="))?.slice("sw_csrf=".length) ?? "");
      const res = await fetch(`/api/v1${path}`, {
        method,
        credentials: "same-origin",
        headers: { "Content-Type": "application/json", Accept: "application/json", "X-CSRF-Token": csrf },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const text = await res.text();
      return { status: res.status, body: text ? JSON.parse(text) : null };
    },
    { method, path, body },
  );
}

/** Invites `email` to the Study as `role` and lets that person sign up from the e-mailed link in `page`. */
export async function inviteAndSignUp(owner: Page, page: Page, server: TestServer, studyId: string, role: string, name: string, email: string) {
  const invite = await pageApi(owner, "POST", `/studies/${studyId}/invitations`, { email, role });
  expect(invite.status).toBe(201);
  const link = (await server.mailTo(email)).links.find((l) => l.includes("/invitations/"));
  expect(link).toBeDefined();
  await page.goto(link!);
  await page.getByRole("link", { name: /create an account|sign up/i }).first().click();
  await page.getByLabel("Name").fill(name);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill("a long enough password");
  await page.getByRole("button", { name: "Create account" }).click();
  // The new account lands on the Study it was invited to.
  await page.waitForURL(new RegExp(`/studies/${studyId}$`));
}

export const stage = (page: Page, name: string) => page.locator(`.react-flow__node[aria-label="Stage ${name}"]`);

/** Drags from the round knob of stage `from` and drops on stage `to` (the same stage makes a loop). */
export async function drawArrow(page: Page, from: string, to: string) {
  const knob = await stage(page, from).locator(".sw-stage-source").boundingBox();
  const target = await stage(page, to).boundingBox();
  if (!knob || !target) throw new Error(`Stage ${from} or ${to} is not on screen.`);
  await page.mouse.move(knob.x + knob.width / 2, knob.y + knob.height / 2);
  await page.mouse.down();
  // For a loop, come back onto the stage's own body, away from the knob.
  const x = from === to ? target.x + target.width * 0.35 : target.x + target.width / 2;
  await page.mouse.move(x, target.y + target.height / 2, { steps: 15 });
  await page.mouse.up();
}

/** λ in the editor header once it describes the current document (not marked stale or pending). */
export async function currentLambda(page: Page): Promise<string> {
  const readout = page.locator('[data-lambda-state="current"] [data-lambda]');
  await readout.waitFor();
  return (await readout.textContent()) ?? "";
}

export async function expectLambda(page: Page, expected: string) {
  await expect.poll(() => page.locator('[data-lambda-state="current"] [data-lambda]').textContent().catch(() => null), { timeout: 10_000 }).toBe(expected);
}

export async function expectSaved(page: Page, version?: number) {
  const status = page.locator('[data-save-status="saved"]');
  await expect
    .poll(async () => ((await status.count()) > 0 ? await status.textContent() : null), { timeout: 10_000 })
    .toMatch(version === undefined ? /Saved · version \d+/ : new RegExp(`Saved · version ${version}$`));
}
