import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { chromium, type BrowserContext, type Page } from "playwright-core";

const FLAGS = ["--headless", "--no-sandbox", "--disable-gpu", "--disable-quic", "--no-first-run", "--disable-background-networking", "--disable-component-update", "--disable-sync"];

/** Debian's Chromium, driven by playwright-core. A missing browser fails the test: it is never skipped. */
export async function launchBrowser(): Promise<{ context: BrowserContext; close: () => Promise<void> }> {
  const executablePath = process.env.STAGEWRIGHT_CHROMIUM ?? "/usr/bin/chromium";
  if (!fs.existsSync(executablePath)) throw new Error(`Chromium is missing at ${executablePath}: run the tests with \`npm test\`, which installs it.`);
  const dir = fs.mkdtempSync(path.join(os.tmpdir(), "sw-chromium-"));
  const context = await chromium.launchPersistentContext(dir, { executablePath, args: FLAGS, viewport: { width: 1280, height: 860 } });
  return {
    context,
    async close() {
      await context.close();
      fs.rmSync(dir, { recursive: true, force: true });
    },
  };
}

/**
 * Collects what the page logs as an error. Resource-load lines for expected
 * HTTP statuses (a 401 before sign-in, say) are the browser's, not ours.
 */
export function watchPageErrors(page: Page): () => string[] {
  const errors: string[] = [];
  page.on("pageerror", (e) => errors.push(`pageerror: ${e.message}`));
  page.on("console", (m) => {
    if (m.type() === "error" && !m.text().startsWith("Failed to load resource")) errors.push(`console: ${m.text()}`);
  });
  return () => errors;
}
