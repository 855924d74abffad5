import { expect, vi } from "vitest";

/** Asserts that console.error was called with a matching message, and clears it so the test may pass. */
export function expectConsoleError(pattern: RegExp): void {
  const calls = vi.mocked(console.error).mock.calls;
  expect(calls.map((a) => a.map(String).join(" ")).some((t) => pattern.test(t))).toBe(true);
  vi.mocked(console.error).mockClear();
}
