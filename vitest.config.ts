import { defineConfig } from "vitest/config";

// Three projects: pure unit tests of shared/ code, API tests against a real
// PostgreSQL, and browser tests driving Debian's Chromium. `scripts/test.mjs`
// starts the database before any of them run.
export default defineConfig({
  test: {
    projects: [
      {
        test: {
          name: "unit",
          include: ["tests/unit/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
        },
      },
      {
        test: {
          name: "api",
          include: ["tests/api/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
          testTimeout: 30_000,
          hookTimeout: 60_000,
        },
      },
      {
        test: {
          name: "e2e",
          include: ["tests/e2e/**/*.test.ts"],
          environment: "node",
          setupFiles: ["tests/setup/fail-on-console-error.ts"],
          testTimeout: 90_000,
          hookTimeout: 120_000,
          fileParallelism: false,
        },
      },
    ],
  },
});
