import { afterEach, beforeEach, vi } from "vitest";

// An unexpected console.error in a test is a failure (STYLE.md).
let errors: unknown[][] = [];
beforeEach(() => {
  errors = [];
  vi.spyOn(console, "error").mockImplementation((...args: unknown[]) => {
    errors.push(args);
  });
});
afterEach(() => {
  vi.mocked(console.error).mockRestore();
  if (errors.length > 0) {
    throw new Error(`console.error was called: ${errors.map((a) => a.map(String).join(" ")).join("\n")}`);
  }
});
