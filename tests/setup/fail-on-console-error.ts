import { afterEach, beforeEach, vi } from "vitest";

// An unexpected console.error in a test is a failure (STYLE.md). A test that
// expects one acknowledges it with `expectConsoleError()` from tests/helpers.
beforeEach(() => {
  vi.spyOn(console, "error").mockImplementation(() => {});
});
afterEach(() => {
  const calls = vi.mocked(console.error).mock.calls;
  const text = calls.map((a) => a.map((x) => (x instanceof Error ? x.stack : String(x))).join(" ")).join("\n");
  vi.mocked(console.error).mockRestore();
  if (calls.length > 0) throw new Error(`console.error was called:\n${text}`);
});
