// `npm test`: the same set-up as `npm start` against a separate test cluster,
// then typecheck, lint, build, and the unit, API and browser tests.
// `npm test -- <vitest arguments>` runs only the tests named (after the set-up).
import fs from "node:fs";
import path from "node:path";
import {
  ensureChromium,
  ensureClientBuild,
  ensureDatabase,
  ensureDependencies,
  ensurePostgres,
  log,
  onShutdown,
  root,
  runBin,
  runTs,
  startCluster,
} from "./lib/setup.mjs";

const PG_PORT = Number(process.env.STAGEWRIGHT_TEST_PG_PORT ?? 54339);
// Several checkouts or people can test side by side with their own cluster and build folder.
const CLUSTER = process.env.STAGEWRIGHT_TEST_CLUSTER ?? "pg-test";
const DIST = process.env.STAGEWRIGHT_DIST ?? "dist";
const vitestArgs = process.argv.slice(2);
const started = Date.now();

let cluster;
onShutdown(() => cluster?.stop());

ensureDependencies();
const chromium = ensureChromium();
const bin = ensurePostgres();
// Test data is thrown away: no need to wait for the disk.
cluster = startCluster(bin, CLUSTER, PG_PORT, { durable: false });
// Every test file clones this migrated template into a database of its own.
const templateUrl = ensureDatabase(bin, PG_PORT, "stagewright_template", { fresh: true });
runTs("server/db/migrate.ts", { DATABASE_URL: templateUrl });

const env = {
  STAGEWRIGHT_TEST_PG: `postgres://postgres@127.0.0.1:${PG_PORT}`,
  STAGEWRIGHT_TEST_TEMPLATE: "stagewright_template",
  STAGEWRIGHT_CHROMIUM: chromium,
  STAGEWRIGHT_DIST: DIST,
  NODE_ENV: "test",
};

const steps = [];
function step(name, fn) {
  const t = Date.now();
  log(`${name}…`);
  const ok = fn();
  steps.push({ name, ok, seconds: (Date.now() - t) / 1000 });
  if (!ok) log(`\x1b[31m${name} failed\x1b[0m`);
}

if (vitestArgs.length === 0) {
  step("typecheck", () => runBin("typescript/bin/tsc", ["--noEmit", "-p", "."]).status === 0);
  step("lint", () => runBin("eslint/bin/eslint.js", [".", "--max-warnings=0"]).status === 0);
  step("build", () => ensureClientBuild({ force: true, outDir: DIST }));
} else {
  step("build", () => ensureClientBuild({ outDir: DIST }));
}

const report = path.join(root, ".data", "vitest-report.json");
fs.rmSync(report, { force: true });
step("tests", () => runBin("vitest/vitest.mjs", ["run", "--reporter=default", "--reporter=json", `--outputFile.json=${report}`, ...vitestArgs], env).status === 0);

let passed = 0;
let failed = 0;
if (fs.existsSync(report)) {
  const r = JSON.parse(fs.readFileSync(report, "utf8"));
  passed = r.numPassedTests;
  // A file that failed without a failing test (it did not load, or a hook threw) counts once.
  const brokenFiles = r.testResults.filter((f) => f.status === "failed" && !f.assertionResults.some((a) => a.status === "failed")).length;
  failed = r.numFailedTests + brokenFiles;
} else {
  failed += 1; // the test runner itself did not report
}
const failedSteps = steps.filter((s) => !s.ok && s.name !== "tests");
failed += failedSteps.length;
console.log("");
for (const s of steps) console.log(`  ${s.ok ? "ok  " : "FAIL"} ${s.name} (${s.seconds.toFixed(1)} s)`);
console.log(`  total ${((Date.now() - started) / 1000).toFixed(0)} s${failedSteps.length ? `; failed steps count as failures: ${failedSteps.map((s) => s.name).join(", ")}` : ""}`);
console.log(`summary: ${passed} passed, ${failed} failed`);
process.exitCode = failed > 0 || steps.some((s) => !s.ok) ? 1 : 0;
