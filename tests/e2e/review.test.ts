// Review in Debian's Chromium: a reviewer comments on an arrow (with an
// @mention), the editor sees the marker on the Diagram, jumps from the thread
// to the arrow, replies and resolves; the mention e-mail arrives with a link
// that opens the thread. A comment full of script-like text renders inert.
import { afterAll, beforeAll, expect, it } from "vitest";
import type { Page } from "playwright-core";
import { memberships } from "../../server/db/schema";
import { threeStageLifeCycle } from "../factories/life-cycles";
import { launchBrowser, watchPageErrors } from "../helpers/browser";
import { signUpAgent, startTestServer, type TestServer } from "../helpers/server";

let server: TestServer;
let browser: Awaited<ReturnType<typeof launchBrowser>>;
let lifeCycleId: string;
const PASSWORD = "correct horse battery";
const people = {
  editor: { name: "Eddie Editor", email: "eddie.editor@example.org" },
  reviewer: { name: "Rita Reviewer", email: "rita.reviewer@example.org" },
};

beforeAll(async () => {
  server = await startTestServer();
  browser = await launchBrowser();
  const owner = await signUpAgent(server, { name: "Olive Owner" });
  const studyId = (await owner.post("/api/v1/studies", { name: "Review pond" })).body.id as string;
  for (const [role, p] of [["editor", people.editor], ["reviewer", people.reviewer]] as const) {
    const a = await signUpAgent(server, { ...p, password: PASSWORD });
    await server.db.insert(memberships).values({ studyId, userId: a.user.id, role });
  }
  const lc = await owner.post(`/api/v1/studies/${studyId}/life-cycles`, { document: threeStageLifeCycle({ name: "Review pond newts" }) });
  expect(lc.status).toBe(201);
  lifeCycleId = lc.body.id as string;
});
afterAll(async () => {
  await browser?.close();
  await server?.close();
});

async function signIn(page: Page, email: string) {
  await page.goto(`${server.url}/sign-in`);
  await page.evaluate(async () => {
    const csrf = decodeURIComponent(document.cookie.split("; ").find((c) => c.startsWith("sw_csrf="))?.slice("sw_csrf=".length) ?? "");
    await fetch("/api/v1/auth/sign-out", { method: "POST", headers: { "X-CSRF-Token": csrf } });
  });
  await page.goto(`${server.url}/sign-in`);
  await page.getByLabel("E-mail").fill(email);
  await page.getByLabel("Password").fill(PASSWORD);
  await page.getByRole("button", { name: "Sign in" }).click();
  await page.waitForURL((url) => !url.pathname.startsWith("/sign-in"));
}

const arrow = (page: Page, name: string) => page.locator(`.react-flow__edge[aria-label^="${name},"]`);

async function run(name: string, body: (page: Page) => Promise<void>) {
  const page = await browser.context.newPage();
  const errors = watchPageErrors(page);
  try {
    await body(page);
    expect(errors()).toEqual([]);
  } catch (error) {
    await page.screenshot({ path: `.data/e2e-review-${name}-failure.png`, fullPage: true }).catch(() => undefined);
    throw error;
  } finally {
    await page.close();
  }
}

it("a reviewer comments on an arrow; the editor sees the marker, goes to the arrow, replies and resolves", async () => {
  await run("thread", async (page) => {
    await signIn(page, people.reviewer.email);
    await page.goto(`${server.url}/life-cycles/${lifeCycleId}`);
    // Reviewers read the model but cannot change it.
    await page.getByText("you can read this life cycle and its results, but not change it").waitFor();
    await arrow(page, "Growth arrow Juvenile → Subadult").locator(".react-flow__edge-textwrapper").click();
    await page.getByRole("heading", { name: "Growth arrow: Juvenile → Subadult" }).waitFor();

    await page.getByRole("tab", { name: /^Review/ }).click();
    const about = page.getByLabel("About");
    await expect.poll(() => about.locator("option:checked").textContent()).toBe("The selection: arrow Juvenile → Subadult (growth)");
    await page.getByLabel("Comment", { exact: true }).fill("Is s_j from the **2019** season only? @Eddie Editor");
    await page.getByText("Will notify: Eddie Editor").waitFor();
    await page.getByRole("button", { name: "Comment", exact: true }).click();
    const thread = page.getByRole("article", { name: "Thread on arrow Juvenile → Subadult (growth)" });
    await thread.waitFor();
    expect(await thread.locator("strong").filter({ hasText: "2019" }).count()).toBe(1);
    // The tab shows the open thread.
    await expect.poll(() => page.getByRole("tab", { name: /^Review/ }).textContent()).toBe("Review1");

    // The mention e-mail links to the thread.
    const mail = await server.mailTo(people.editor.email);
    expect(mail.subject).toBe("Rita Reviewer mentioned you in a comment on “Review pond newts”");
    const link = mail.links.find((l) => l.includes("thread="))!;

    await signIn(page, people.editor.email);
    await page.goto(`${server.url}/life-cycles/${lifeCycleId}`);
    const marker = arrow(page, "Growth arrow Juvenile → Subadult").locator("[data-comment-marker]");
    await marker.waitFor();
    expect(await marker.textContent()).toContain("✎ 1");
    expect(await page.locator("[data-comment-marker]").count()).toBe(1);

    // The e-mailed link opens the Review tab with the thread in view.
    await page.goto(link);
    const focused = page.locator('article[data-thread-id].ring-2');
    await focused.waitFor();
    expect(await focused.getAttribute("aria-label")).toBe("Thread on arrow Juvenile → Subadult (growth)");

    // "Show on the Diagram" selects the arrow there.
    await focused.getByRole("button", { name: "Show on the Diagram" }).click();
    await page.getByRole("heading", { name: "Growth arrow: Juvenile → Subadult" }).waitFor();
    expect(await page.getByRole("tab", { name: "Diagram" }).getAttribute("aria-selected")).toBe("true");

    await page.getByRole("tab", { name: /^Review/ }).click();
    const editorThread = page.getByRole("article", { name: "Thread on arrow Juvenile → Subadult (growth)" });
    await editorThread.getByRole("button", { name: "Reply" }).click();
    await editorThread.getByLabel("Reply").fill("Yes: the 2019 season, 38 marked juveniles.");
    await editorThread.getByRole("button", { name: "Reply" }).click();
    await editorThread.getByText("Yes: the 2019 season, 38 marked juveniles.").waitFor();
    await editorThread.getByRole("button", { name: "Resolve thread" }).click();
    // Resolved threads leave the open list…
    await expect.poll(() => page.getByRole("article").count()).toBe(0);
    await page.getByText("No open threads.").waitFor();
    await page.getByLabel("Show").selectOption("resolved");
    await page.getByRole("article", { name: "Thread on arrow Juvenile → Subadult (growth)" }).getByText("Resolved by Eddie Editor").waitFor();
    // …and their markers leave the Diagram.
    await page.getByRole("tab", { name: "Diagram" }).click();
    await arrow(page, "Growth arrow Juvenile → Subadult").waitFor();
    expect(await page.locator("[data-comment-marker]").count()).toBe(0);

    // The reviewer hears about the reply.
    const reply = await server.mailTo(people.reviewer.email);
    expect(reply.subject).toBe("Eddie Editor replied to your comment on “Review pond newts”");
  });
});

it("shows script-like text in a comment as text: no script runs, no dialog opens, no javascript: link", async () => {
  await run("xss", async (page) => {
    const dialogs: string[] = [];
    page.on("dialog", (d) => {
      dialogs.push(d.message());
      void d.dismiss();
    });
    await signIn(page, people.reviewer.email);
    await page.goto(`${server.url}/life-cycles/${lifeCycleId}?tab=review`);
    const payload = [
      "<script>alert('script')</script>",
      '<img src=x onerror="alert(\'img\')">',
      "[click me](javascript:alert('link'))",
      '<a href="javascript:alert(\'a\')" onclick="alert(\'click\')">raw link</a>',
      "<b onmouseover=\"alert('hover')\">bold?</b>",
    ].join("\n\n");
    await page.getByLabel("Comment", { exact: true }).fill(payload);
    await page.getByRole("button", { name: "Comment", exact: true }).click();
    const body = page.getByRole("article", { name: "Thread on the life cycle as a whole" }).locator("[data-comment-body]");
    await body.waitFor();
    const text = (await body.innerText()).replace(/\s+/g, " ");
    expect(text).toContain("<script>alert('script')</script>");
    expect(text).toContain('<img src=x onerror="alert(\'img\')">');
    expect(text).toContain("<a href=\"javascript:alert('a')\" onclick=\"alert('click')\">raw link</a>");
    expect(text).toContain("<b onmouseover=\"alert('hover')\">bold?</b>");
    // Nothing typed became an element with behaviour.
    expect(await body.locator("script, img, b, [onerror], [onclick], [onmouseover]").count()).toBe(0);
    expect(await body.locator("a").count()).toBe(0);
    await body.getByText("click me").click();
    await body.getByText("bold?").hover();
    await page.waitForTimeout(300);
    expect(dialogs).toEqual([]);
    expect(page.url()).toContain(`/life-cycles/${lifeCycleId}`);
  });
});
