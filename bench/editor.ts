// Speed budget of the life-cycle editor, measured in Debian's Chromium against
// a real Stagewright server on loopback. Run: node --import tsx bench/editor.ts
//
//  1. Edit → λ: a 50-stage size-classified life cycle (164 arrows, formulas of
//     60 named vital rates) is opened in the editor; real edits are made
//     through the UI — a vital rate's value on the Rates tab (committed with
//     Enter) and an arrow's rate in the Diagram inspector (applied as typed) —
//     and the time from the keystroke to the new λ painted in the header (no
//     longer marked "recomputing") is timed inside the page. The ~150 ms
//     debounce is included. Each λ shown is checked against analyzeMatrix on
//     the edited matrix, to 4 decimals. Budget: ≤ 300 ms (median and p90).
//  2. JavaScript sizes: the sign-in page's JS in a fresh browser profile
//     (budget 250 kB gzip), and the chunks the editor and its tabs load lazily.
//
// Needs the test PostgreSQL that `npm test` starts (STAGEWRIGHT_TEST_PG,
// STAGEWRIGHT_TEST_TEMPLATE). Without STAGEWRIGHT_TEST_PG it starts its own
// cluster "pg-bench" on 127.0.0.1:54404 (STAGEWRIGHT_BENCH_PG_PORT) with a
// freshly migrated template, and stops it at the end. The client is built
// into STAGEWRIGHT_DIST (default /tmp/sw-dist-bench) when that build is stale.
// The server runs in this process, as in the browser tests; every document is
// first analysed in a worker thread with a time limit, so an analysis that
// never returns is reported instead of freezing the bench.
// Options: --edits=N measured edits per scenario (default 25, at least 20);
// --cpu-profile records the page's CPU during the edits (.cpuprofile files in
// the temp folder, for DevTools; the chunks' source maps sit beside them).
// Budgets are reported, never asserted: the exit code is 0 unless something
// broke or a λ on screen was wrong.
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";
import { Worker, isMainThread, parentPort } from "node:worker_threads";
import { gzipSync } from "node:zlib";
import type { Page } from "playwright-core";
import { analyzeMatrix } from "../shared/demography/index";
import { buildMatrices, type LifeCycle, type Stage, type Transition, type VitalRate } from "../shared/lifecycle/index";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");

const EDIT_BUDGET_MS = 300;
const SIGN_IN_JS_BUDGET_BYTES = 250_000;
const WARM_UP_EDITS = 2;
const editsArg = process.argv.find((a) => a.startsWith("--edits="));
const MEASURED_EDITS = Math.max(20, Number(editsArg?.slice("--edits=".length) ?? 25) || 25);
/** `--cpu-profile`: record the page's CPU during each scenario (.cpuprofile files for DevTools) and list where it went. */
const CPU_PROFILE = process.argv.includes("--cpu-profile");
/** gzip level most HTTP servers and compression middleware use by default. */
const GZIP_LEVEL = 6;

// ------------------------------------------------------------------ set-up
/** The parts of scripts/lib/setup.mjs (dependency-free, untyped) this bench uses. */
interface SetupHelpers {
  ensurePostgres(): string;
  ensureChromium(): string;
  startCluster(bin: string, name: string, port: number, options?: { durable?: boolean }): { stop: () => void };
  ensureDatabase(bin: string, port: number, name: string, options?: { fresh?: boolean; template?: string }): string;
  ensureClientBuild(options?: { force?: boolean; outDir?: string }): boolean;
  onShutdown(fn: () => void): (code?: number) => void;
  log(message: string): void;
}

async function prepareEnvironment(setup: SetupHelpers): Promise<{ stopCluster: () => void; dist: string }> {
  let stopCluster = () => {};
  setup.ensureChromium();
  if (!process.env.STAGEWRIGHT_TEST_PG) {
    const port = Number(process.env.STAGEWRIGHT_BENCH_PG_PORT ?? 54404);
    const bin = setup.ensurePostgres();
    // Bench data is thrown away: no need to wait for the disk.
    const cluster = setup.startCluster(bin, "pg-bench", port, { durable: false });
    stopCluster = () => cluster.stop();
    setup.onShutdown(stopCluster);
    const templateUrl = setup.ensureDatabase(bin, port, "stagewright_bench_template", { fresh: true });
    const { runMigrations } = await import("../server/db/migrate");
    await runMigrations(templateUrl);
    process.env.STAGEWRIGHT_TEST_PG = `postgres://postgres@127.0.0.1:${port}`;
    process.env.STAGEWRIGHT_TEST_TEMPLATE = "stagewright_bench_template";
  }
  // ensureClientBuild joins outDir onto the checkout, so an absolute folder is passed relative to it.
  const dist = path.resolve(root, process.env.STAGEWRIGHT_DIST ?? "/tmp/sw-dist-bench");
  if (dist.split(path.sep).some((part) => part.startsWith(".") && part !== "." && part !== "..")) {
    throw new Error(`Build folder ${dist} is inside a dot-folder; the server's static files refuse such paths. Choose another STAGEWRIGHT_DIST.`);
  }
  if (!setup.ensureClientBuild({ outDir: path.relative(root, dist) })) throw new Error("The client build failed.");
  process.env.STAGEWRIGHT_DIST = dist;
  return { stopCluster, dist };
}

// ------------------------------------------------------------- test model
/**
 * An invented size-classified life cycle: 50 size classes in 10 groups of 5.
 * Each class survives (s_k) and stays, grows one class (g_k, scaled by env)
 * or, from class 11 on, shrinks one class (h_k); classes 31–50 reproduce into
 * class 1 (b_k breeding, m_k offspring, w_i relative fecundity of the class,
 * e_0 establishment, sr share of females), and the five largest also into
 * class 2 (e_1). 60 named vital rates, 164 arrows.
 */
export function sizeClassLifeCycle(): LifeCycle {
  const n = 50;
  const group = (i: number) => Math.ceil(i / 5);
  const pad = (i: number) => String(i).padStart(2, "0");
  const round = (v: number) => Math.round(v * 1e4) / 1e4;
  const rates: VitalRate[] = [];
  const rate = (name: string, value: number, unit?: string) => rates.push({ id: `vr_${name}`, name, value: round(value), ...(unit ? { unit } : {}) });
  for (let k = 1; k <= 10; k++) rate(`s_${k}`, 0.85 + 0.012 * (k - 1));
  for (let k = 1; k <= 10; k++) rate(`g_${k}`, 0.75 - 0.04 * (k - 1));
  for (let k = 3; k <= 10; k++) rate(`h_${k}`, 0.02 + 0.005 * (k - 3));
  for (let k = 7; k <= 10; k++) rate(`b_${k}`, 0.55 + 0.1 * (k - 7));
  for (let k = 7; k <= 10; k++) rate(`m_${k}`, [200, 400, 800, 1600][k - 7]!, "seeds per breeder");
  for (let i = 31; i <= 50; i++) rate(`w_${i}`, 0.8 + 0.02 * (i - 31));
  rate("e_0", 0.1);
  rate("e_1", 0.025);
  rate("sr", 0.5);
  rate("env", 1);

  const stages: Stage[] = [];
  for (let i = 1; i <= n; i++) {
    // A snake through a 10 × 5 grid, so neighbouring classes sit side by side.
    const row = Math.floor((i - 1) / 10);
    const col = row % 2 === 0 ? (i - 1) % 10 : 9 - ((i - 1) % 10);
    stages.push({ id: `st_c${pad(i)}`, name: `Class ${pad(i)}`, position: { x: col * 220, y: row * 160 } });
  }
  const transitions: Transition[] = [];
  const arrow = (id: string, from: number, to: number, kind: Transition["kind"], formula: string) =>
    transitions.push({ id, from: `st_c${pad(from)}`, to: `st_c${pad(to)}`, kind, rate: formula });
  for (let i = 1; i <= n; i++) {
    const k = group(i);
    const shrinks = i >= 11;
    if (i < n) {
      arrow(`tr_s${pad(i)}`, i, i, "stasis", shrinks ? `s_${k} * (1 - g_${k} * env - h_${k})` : `s_${k} * (1 - g_${k} * env)`);
      arrow(`tr_g${pad(i)}`, i, i + 1, "growth", `s_${k} * g_${k} * env`);
    } else arrow(`tr_s${pad(i)}`, i, i, "stasis", `s_${k} * (1 - h_${k})`);
    if (shrinks) arrow(`tr_h${pad(i)}`, i, i - 1, "shrinkage", `s_${k} * h_${k}`);
    if (i >= 31) arrow(`tr_f${pad(i)}`, i, 1, "reproduction", `b_${k} * m_${k} * w_${i} * e_0 * sr`);
    if (i >= 46) arrow(`tr_e${pad(i)}`, i, 2, "reproduction", `b_${k} * m_${k} * w_${i} * e_1 * sr`);
  }
  return { stagewright: 2, name: "Bench: 50 size classes", census: "pre-breeding", timeStepUnit: "year", stages, rates, transitions };
}

/** λ to 4 decimals from the numerical core, on the matrix the document gives. */
function expectedLambda(doc: LifeCycle): string {
  const m = buildMatrices(doc);
  if (m.errors.length > 0) throw new Error(`The bench document cannot be analysed: ${m.errors[0]!.message}`);
  return analyzeMatrix({ A: m.A }).lambda.toFixed(4);
}

// ------------------------------------------------------ analysis in a worker
/**
 * The server's analysis of a document (parse the JSON body, validate, analyse,
 * serialise the answer, as POST /analyze does), run in a worker thread. It
 * times the server's share, and it vets every document before the page sends
 * it: the server runs in this process, so an analysis that never returns
 * would freeze the bench with it; here it is stopped after `timeoutMs`.
 */
class AnalysisProbe {
  private worker: Worker;
  private next = 0;
  private readonly pending = new Map<number, (answer: { ms: number; bytes: number } | { error: string }) => void>();

  constructor() {
    this.worker = this.spawn();
  }

  private spawn(): Worker {
    // Workers do not inherit tsx's loader on Node 20: register it, then load this file.
    const tsx = import.meta.resolve("tsx/esm/api");
    const boot = `import(${JSON.stringify(tsx)}).then((m) => { m.register(); return import(${JSON.stringify(import.meta.url)}); })`;
    const worker = new Worker(boot, { eval: true });
    worker.on("message", (m: { id: number; ms: number; bytes: number } | { id: number; error: string }) => {
      this.pending.get(m.id)?.(m);
      this.pending.delete(m.id);
    });
    return worker;
  }

  /** Milliseconds and response bytes of the analysis, or "timeout" (the worker is replaced). */
  run(document: LifeCycle, timeoutMs = 10_000): Promise<{ ms: number; bytes: number } | "timeout"> {
    const id = ++this.next;
    return new Promise((resolve, reject) => {
      const timer = setTimeout(() => {
        this.pending.delete(id);
        void this.worker.terminate();
        this.worker = this.spawn();
        resolve("timeout");
      }, timeoutMs);
      this.pending.set(id, (answer) => {
        clearTimeout(timer);
        if ("error" in answer) reject(new Error(`The analysis failed: ${answer.error}`));
        else resolve(answer);
      });
      this.worker.postMessage({ id, body: JSON.stringify({ document }) });
    });
  }

  close(): Promise<number> {
    return this.worker.terminate();
  }
}

async function analysisWorker(port: NonNullable<typeof parentPort>) {
  const { parseDocument } = await import("../server/services/life-cycles");
  const { analyzeLifeCycle } = await import("../server/services/analysis");
  port.on("message", ({ id, body }: { id: number; body: string }) => {
    try {
      const t0 = performance.now();
      const result = analyzeLifeCycle(parseDocument((JSON.parse(body) as { document: unknown }).document));
      const bytes = JSON.stringify(result).length;
      port.postMessage({ id, ms: performance.now() - t0, bytes });
    } catch (error) {
      port.postMessage({ id, error: String(error) });
    }
  });
}

// --------------------------------------------------------------- page side
interface EditTiming {
  /** The keystroke (Enter) or the input event that made the edit (page clock, ms). */
  edit: number;
  /** The edit rendered: the readout first marked recomputing. */
  stale: number | null;
  /** The new λ in the DOM, marked current. */
  dom: number;
  /** The animation frame after that change (the frame that paints it). */
  frame: number;
  text: string;
  request: { count: number; start: number; requestStart: number; responseStart: number; end: number; bytes: number } | null;
  /** Long tasks (> 50 ms) overlapping the edit → frame window: their total and count. */
  longTasks: { total: number; count: number };
}

interface BenchWindow {
  __swArm?: (previous: string, trigger: "enter" | "input") => void;
  __swEdit?: Promise<EditTiming>;
}

/**
 * In-page timer, as plain JavaScript: tsx compiles the bench with esbuild's
 * keepNames, whose `__name` helper does not exist in the page, so functions
 * written in TypeScript inside page.evaluate would fail there.
 * `__swArm(previous, trigger)`: the next `trigger` event (Enter keydown, or an
 * input event) is the edit; the first change of λ away from `previous`,
 * marked current, ends it, and `__swEdit` resolves with an EditTiming.
 */
const ARM_SCRIPT = `
window.__swArm = function (previous, trigger) {
  if (!window.__swLongTasks) {
    var tasks = [];
    window.__swLongTasks = tasks;
    new PerformanceObserver(function (list) { tasks.push.apply(tasks, list.getEntries()); }).observe({ type: "longtask", buffered: true });
  }
  performance.clearResourceTimings();
  var readout = document.querySelector("[data-lambda-state]");
  var host = readout && readout.parentElement;
  if (!host) throw new Error("The λ readout is not on the page.");
  var edit = null;
  var stale = null;
  var type = trigger === "enter" ? "keydown" : "input";
  window.__swEdit = new Promise(function (resolve, reject) {
    var observer;
    var timer;
    function onEvent(event) {
      if (edit !== null) return;
      if (trigger === "enter" && event.key !== "Enter") return;
      edit = event.timeStamp;
    }
    function stop() {
      observer.disconnect();
      window.clearTimeout(timer);
      window.removeEventListener(type, onEvent, { capture: true });
    }
    function look() {
      var el = host.querySelector("[data-lambda-state]");
      var shown = el && el.querySelector("[data-lambda]");
      return { state: el ? el.getAttribute("data-lambda-state") : null, text: shown ? shown.textContent : "" };
    }
    window.addEventListener(type, onEvent, { capture: true });
    timer = window.setTimeout(function () {
      stop();
      var now = look();
      reject(new Error("λ did not refresh within 15 s (state " + now.state + ", shows " + now.text + ")."));
    }, 15000);
    observer = new MutationObserver(function () {
      if (edit === null) return;
      var now = performance.now();
      var seen = look();
      if (seen.state !== "current") {
        if (stale === null) stale = now;
        return;
      }
      if (seen.text === previous) return;
      stop();
      var started = edit;
      window.requestAnimationFrame(function () {
        var frame = performance.now();
        var requests = performance.getEntriesByType("resource").filter(function (e) { return e.name.endsWith("/api/v1/analyze") && e.startTime >= started; });
        var last = requests[requests.length - 1];
        var tasks = window.__swLongTasks.filter(function (t) { return t.startTime + t.duration > started && t.startTime < frame; });
        resolve({
          edit: started,
          stale: stale,
          dom: now,
          frame: frame,
          text: seen.text,
          request: last
            ? { count: requests.length, start: last.startTime, requestStart: last.requestStart, responseStart: last.responseStart, end: last.responseEnd, bytes: last.encodedBodySize }
            : null,
          longTasks: { total: tasks.reduce(function (s, t) { return s + t.duration; }, 0), count: tasks.length },
        });
      });
    });
    observer.observe(host, { subtree: true, childList: true, characterData: true, attributes: true });
  });
};
`;

async function armEditTimer(page: Page, previous: string, trigger: "enter" | "input") {
  if (!(await page.evaluate(() => "__swArm" in window))) await page.evaluate(ARM_SCRIPT);
  await page.evaluate(([p, t]) => (window as unknown as BenchWindow).__swArm!(p, t), [previous, trigger] as const);
}

const editResult = (page: Page) => page.evaluate(() => (window as unknown as BenchWindow).__swEdit!);

/** A JSON request from the page's own session (cookie and CSRF header, as the client sends them). */
async function pageApi<T>(page: Page, method: string, apiPath: string, body?: unknown): Promise<T> {
  const res = await page.evaluate(
    async ({ method, apiPath, body }) => {
      const csrf = decodeURIComponent(document.cookie.split("; ").find((c) => c.startsWith("sw_csrf="))?.slice("sw_csrf=".length) ?? "");
      const r = await fetch(`/api/v1${apiPath}`, {
        method,
        credentials: "same-origin",
        headers: { "Content-Type": "application/json", Accept: "application/json", "X-CSRF-Token": csrf },
        body: body === undefined ? undefined : JSON.stringify(body),
      });
      const text = await r.text();
      return { status: r.status, body: text ? JSON.parse(text) : null };
    },
    { method, apiPath, body },
  );
  if (res.status >= 300) throw new Error(`${method} ${apiPath} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body as T;
}

const currentLambda = async (page: Page) => {
  const readout = page.locator('[data-lambda-state="current"] [data-lambda]');
  await readout.waitFor({ timeout: 20_000 });
  return (await readout.textContent()) ?? "";
};

const waitSaved = (page: Page) => page.locator('[data-save-status="saved"]').waitFor({ timeout: 20_000 });

// ------------------------------------------------------------- statistics
const percentile = (sorted: number[], p: number) => sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil(p * sorted.length) - 1))]!;
const median = (xs: number[]) => percentile([...xs].sort((a, b) => a - b), 0.5);
const ms = (x: number) => `${x.toFixed(0).padStart(5)} ms`;
const kB = (bytes: number) => `${(bytes / 1000).toFixed(1)} kB`;

interface Scenario {
  label: string;
  timings: EditTiming[];
  warmUp: EditTiming[];
  mismatches: string[];
  profile: string[];
}

function summarise(s: Scenario): { painted: number[]; line: string; pass: boolean } {
  const painted = s.timings.map((t) => t.frame - t.edit).sort((a, b) => a - b);
  const p50 = percentile(painted, 0.5);
  const p90 = percentile(painted, 0.9);
  const max = painted.at(-1)!;
  const pass = p50 <= EDIT_BUDGET_MS && p90 <= EDIT_BUDGET_MS;
  return { painted, pass, line: `median ${ms(p50)}   p90 ${ms(p90)}   max ${ms(max)}   (n = ${painted.length})` };
}

/** Where the time goes, medians over the measured edits. */
function breakdown(s: Scenario): string[] {
  const withRequest = s.timings.filter((t) => t.request);
  const col = (label: string, values: number[]) => `    ${label.padEnd(52)}${ms(median(values))}`;
  const lines = [
    col("edit rendered (keystroke → readout marked recomputing)", s.timings.filter((t) => t.stale !== null).map((t) => t.stale! - t.edit)),
    col("keystroke → POST /analyze sent (the 150 ms pause included)", withRequest.map((t) => t.request!.start - t.edit)),
    col("request sent → first byte (server: parse, validate, analyse)", withRequest.map((t) => t.request!.responseStart - t.request!.start)),
    col("first byte → last byte (response download)", withRequest.map((t) => t.request!.end - t.request!.responseStart)),
    col("response → new λ in the DOM (parse JSON, React render)", withRequest.map((t) => t.dom - t.request!.end)),
    col("DOM → next animation frame", s.timings.map((t) => t.frame - t.dom)),
    col("long tasks (> 50 ms) in the window, total", s.timings.map((t) => t.longTasks.total)),
  ];
  const slowest = [...s.timings].sort((a, b) => b.frame - b.edit - (a.frame - a.edit)).slice(0, 3);
  const phases = (t: EditTiming) =>
    t.request
      ? `${(t.frame - t.edit).toFixed(0)} ms = ${(t.request.start - t.edit).toFixed(0)} to send + ${(t.request.responseStart - t.request.start).toFixed(0)} server + ${(t.request.end - t.request.responseStart).toFixed(0)} download + ${(t.frame - t.request.end).toFixed(0)} render`
      : `${(t.frame - t.edit).toFixed(0)} ms (no request seen)`;
  lines.push(`    slowest: ${slowest.map(phases).join("; ")}`);
  const bytes = median(withRequest.map((t) => t.request!.bytes));
  const extra = withRequest.filter((t) => t.request!.count > 1).length;
  lines.push(`    analysis response body ${kB(bytes)} (median); edits that sent more than one request: ${extra}`);
  return lines;
}

// ------------------------------------------------------------- CPU profile
interface CpuProfile {
  nodes: { id: number; callFrame: { functionName: string; url: string; lineNumber: number; columnNumber: number } }[];
  samples: number[];
  timeDeltas: number[];
}

/** Records the page's CPU while `during` runs; writes the profile and returns a summary by script and by function. */
async function profileCpu(page: Page, label: string, during: () => Promise<void>): Promise<string[]> {
  if (!CPU_PROFILE) {
    await during();
    return [];
  }
  const cdp = await page.context().newCDPSession(page);
  await cdp.send("Profiler.enable");
  await cdp.send("Profiler.setSamplingInterval", { interval: 250 });
  await cdp.send("Profiler.start");
  try {
    await during();
  } catch (error) {
    await cdp.detach();
    throw error;
  }
  const { profile } = (await cdp.send("Profiler.stop")) as unknown as { profile: CpuProfile };
  await cdp.detach();
  const file = path.join(os.tmpdir(), `sw-bench-editor-${label}.cpuprofile`);
  fs.writeFileSync(file, JSON.stringify(profile));
  const byId = new Map(profile.nodes.map((n) => [n.id, n.callFrame]));
  const byScript = new Map<string, number>();
  const byFunction = new Map<string, number>();
  let total = 0;
  profile.samples.forEach((id, k) => {
    const frame = byId.get(id)!;
    const dt = (profile.timeDeltas[k] ?? 0) / 1000;
    total += dt;
    const script = frame.url ? path.basename(new URL(frame.url, "http://x").pathname) : frame.functionName;
    byScript.set(script, (byScript.get(script) ?? 0) + dt);
    const fn = `${frame.functionName || "(anonymous)"} ${script}${frame.url ? `:${frame.lineNumber + 1}:${frame.columnNumber + 1}` : ""}`;
    byFunction.set(fn, (byFunction.get(fn) ?? 0) + dt);
  });
  const top = (m: Map<string, number>, k: number) =>
    [...m].sort((a, b) => b[1] - a[1]).slice(0, k).map(([name, t]) => `      ${ms(t)}  ${(100 * t / total).toFixed(1).padStart(5)} %  ${name}`);
  return [`    CPU profile (${file}), ${ms(total).trim()} sampled; self time by script:`, ...top(byScript, 8), "    by function:", ...top(byFunction, 15)];
}

// ------------------------------------------------------------------ main
async function main() {
  const setup = (await import(pathToFileURL(path.join(root, "scripts/lib/setup.mjs")).href)) as SetupHelpers;
  const { stopCluster, dist } = await prepareEnvironment(setup);
  // Imported after the environment is set: the helpers read it when called.
  const { startTestServer } = await import("../tests/helpers/server");
  const { launchBrowser } = await import("../tests/helpers/browser");

  const load = os.loadavg();
  const probe = new AnalysisProbe();
  /** Documents whose analysis did not finish within the probe's time limit (never sent to the page). */
  const stuck: string[] = [];
  const analysable = async (doc: LifeCycle, what: string) => {
    if ((await probe.run(doc)) !== "timeout") return true;
    stuck.push(what);
    return false;
  };
  const model = sizeClassLifeCycle();
  if (!(await analysable(model, "the bench model as created"))) {
    await probe.close();
    stopCluster();
    throw new Error("The server's analysis of the bench model does not finish within 10 s; nothing was measured.");
  }
  const server = await startTestServer();
  const browser = await launchBrowser();
  let failed = false;
  try {
    const page = await browser.context.newPage();
    page.setDefaultTimeout(20_000);
    const pageErrors: string[] = [];
    page.on("pageerror", (e) => pageErrors.push(e.message));
    page.on("console", (m) => {
      if (m.type() === "error" && !m.text().startsWith("Failed to load resource")) pageErrors.push(m.text());
    });

    // ------------------------------------------------ JavaScript by phase
    // The profile is fresh: nothing is cached, so the sign-in page loads everything it needs.
    const phaseOf = new Map<string, string>();
    const encodings = new Set<string>();
    let phase = "sign-in";
    page.on("response", (r) => {
      const url = new URL(r.url());
      if (!url.pathname.endsWith(".js")) return;
      encodings.add(r.headers()["content-encoding"] ?? "none");
      if (!phaseOf.has(url.pathname)) phaseOf.set(url.pathname, phase);
    });
    // Scripts reused from the memory cache fire no response event; the page's resource timing lists them.
    const collectScripts = async () => {
      const names = await page.evaluate(() => performance.getEntriesByType("resource").map((e) => e.name));
      for (const name of names) {
        const p = new URL(name).pathname;
        if (p.endsWith(".js") && !phaseOf.has(p)) phaseOf.set(p, phase);
      }
    };
    setup.log("Bench: the sign-in page in a fresh profile…");
    await page.goto(`${server.url}/sign-in`, { waitUntil: "networkidle" });
    await page.getByRole("button", { name: "Sign in", exact: true }).waitFor();
    await collectScripts();

    // ------------------------------------------- account, Study, life cycle
    const email = `bench.${Date.now()}@example.org`;
    await pageApi(page, "POST", "/auth/sign-up", { name: "Bench Editor", email, password: "a long enough password" });
    const study = await pageApi<{ id: string }>(page, "POST", "/studies", { name: "Editor bench" });
    const created = await pageApi<{ id: string; document: LifeCycle }>(page, "POST", `/studies/${study.id}/life-cycles`, { document: model });
    let doc = created.document;
    const stages = doc.stages.length;
    const arrows = doc.transitions.length;
    const rateCount = doc.rates.length;

    setup.log(`Bench: opening a ${stages}-stage life cycle in the editor…`);
    phase = "editor (route + Diagram tab)";
    await page.goto(`${server.url}/life-cycles/${created.id}`, { waitUntil: "networkidle" });
    let shown = await currentLambda(page);
    await page.locator(".react-flow__node").nth(stages - 1).waitFor();
    await collectScripts();
    if (shown !== expectedLambda(doc)) throw new Error(`λ on opening: ${shown}, the core says ${expectedLambda(doc)}.`);
    const openingLambda = shown;

    const tabs = (await page.getByRole("tab").allTextContents()).map((t) => t.trim()).filter((t) => t !== "Diagram");
    for (const tab of tabs) {
      phase = `${tab} tab`;
      await page.getByRole("tab", { name: tab, exact: true }).click();
      // The selected tab's panel shows its own content, not the lazy-loading placeholder.
      await page.waitForFunction((name) => {
        const selected = document.querySelector('[role="tab"][aria-selected="true"]');
        const panel = selected && document.getElementById(selected.getAttribute("aria-controls") ?? "");
        const text = panel?.textContent ?? "";
        return selected?.textContent?.trim() === name && text.trim() !== "" && !text.includes("Loading the");
      }, tab);
      await page.waitForLoadState("networkidle");
      await collectScripts();
    }

    const gz = (file: string) => {
      const body = fs.readFileSync(path.join(dist, file));
      return { raw: body.length, gzip: gzipSync(body, { level: GZIP_LEVEL }).length };
    };
    const scripts = [...phaseOf].map(([file, ph]) => ({ file, phase: ph, ...gz(file) }));

    // --------------------------------------------------- edit → λ, Rates tab
    setup.log("Bench: timing the server's analysis on its own…");
    // The server's own share on the same document, warmed up as a running server is.
    const serverTimes: number[] = [];
    let responseBytes = 0;
    for (let i = 0; i < 40; i++) {
      const run = await probe.run(doc);
      if (run === "timeout") throw new Error("The analysis of the opened document stopped finishing.");
      responseBytes = run.bytes;
      if (i >= 10) serverTimes.push(run.ms);
    }

    const rates: Scenario = { label: "Rates tab: a vital rate's value, committed with Enter", timings: [], warmUp: [], mismatches: [], profile: [] };
    setup.log(`Bench: ${WARM_UP_EDITS} + ${MEASURED_EDITS} edits on the Rates tab…`);
    await page.getByRole("tab", { name: "Rates", exact: true }).click();
    // Rates spread over the life cycle; probabilities stay at or below 0.99.
    const rateCycle = ["s_3", "g_2", "s_6", "m_8", "g_5", "s_9", "e_0", "s_1", "g_7", "w_40", "s_10", "b_8"];
    rates.profile = await profileCpu(page, "rates", async () => {
      for (let i = 0; i < WARM_UP_EDITS + MEASURED_EDITS; i++) {
        // A new value whose λ differs at 4 decimals from the one on screen.
        let next: LifeCycle | null = null;
        let text = "";
        let name = "";
        search: for (let r = 0; r < rateCycle.length; r++) {
          name = rateCycle[(i + r) % rateCycle.length]!;
          const rate = doc.rates.find((x) => x.name === name)!;
          const cap = /^[sghb]_/.test(name) ? 0.99 : Infinity;
          for (const step of [0.03, 0.06, 0.12]) {
            const value = Math.min(cap, Math.round(rate.value * (i % 2 === 0 ? 1 - step : 1 + step) * 1e4) / 1e4);
            const candidate = { ...doc, rates: doc.rates.map((x) => (x.id === rate.id ? { ...x, value } : x)) };
            if (value !== rate.value && expectedLambda(candidate) !== shown && (await analysable(candidate, `${name} = ${value}`))) {
              next = candidate;
              text = String(value);
              break search;
            }
          }
        }
        if (!next) throw new Error("No change of the bench's rates moves λ at 4 decimals.");
        const field = page.getByLabel(`Value of ${name}`, { exact: true });
        await field.fill(text);
        await armEditTimer(page, shown, "enter");
        await field.press("Enter");
        const timing = await editResult(page);
        doc = next;
        const want = expectedLambda(doc);
        if (timing.text !== want) rates.mismatches.push(`${name} = ${text}: screen ${timing.text}, core ${want}`);
        shown = timing.text;
        (i < WARM_UP_EDITS ? rates.warmUp : rates.timings).push(timing);
        await waitSaved(page);
      }
    });

    // ---------------------------------------- edit → λ, Diagram inspector
    const diagram: Scenario = { label: "Diagram inspector: an arrow's rate, applied as typed", timings: [], warmUp: [], mismatches: [], profile: [] };
    setup.log(`Bench: ${WARM_UP_EDITS} + ${MEASURED_EDITS} edits in the Diagram inspector…`);
    await page.getByRole("tab", { name: "Diagram", exact: true }).click();
    await page.locator(".react-flow__node").nth(stages - 1).waitFor();
    // The arrow λ is most sensitive to: every edit of it shows.
    const m = buildMatrices(doc);
    const E = analyzeMatrix({ A: m.A }).elasticity!;
    const target = m.entries.reduce((best, e) => ((E[e.row]?.[e.col] ?? 0) > (E[best.row]?.[best.col] ?? 0) ? e : best));
    const baseFormula = String(doc.transitions.find((t) => t.id === target.transitionId)!.rate);
    await page.locator(`.react-flow__edge[data-id="${target.transitionId}"]`).focus();
    await page.keyboard.press("Enter");
    const rateField = page.getByLabel("Rate", { exact: true });
    await rateField.waitFor();
    diagram.profile = await profileCpu(page, "diagram", async () => {
      for (let i = 0; i < WARM_UP_EDITS + MEASURED_EDITS; i++) {
        let next: LifeCycle | null = null;
        let text = "";
        for (const step of [0.01, 0.02, 0.04, 0.08]) {
          const factor = (1 + (i % 2 === 0 ? -1 : 1) * step * (1 + (i % 5))).toFixed(3);
          const formula = `(${baseFormula}) * ${factor}`;
          const candidate = { ...doc, transitions: doc.transitions.map((t) => (t.id === target.transitionId ? { ...t, rate: formula } : t)) };
          if (expectedLambda(candidate) !== shown && (await analysable(candidate, `${target.transitionId} = ${formula}`))) {
            next = candidate;
            text = formula;
            break;
          }
        }
        if (!next) throw new Error(`No change of arrow ${target.transitionId} moves λ at 4 decimals.`);
        await armEditTimer(page, shown, "input");
        await rateField.fill(text);
        const timing = await editResult(page);
        doc = next;
        const want = expectedLambda(doc);
        if (timing.text !== want) diagram.mismatches.push(`${target.transitionId} = ${text}: screen ${timing.text}, core ${want}`);
        shown = timing.text;
        (i < WARM_UP_EDITS ? diagram.warmUp : diagram.timings).push(timing);
        await waitSaved(page);
      }
    });

    // The saved document is the one this bench edited alongside the page.
    const saved = await pageApi<{ document: LifeCycle; version: number }>(page, "GET", `/life-cycles/${created.id}`);
    const savedMatches = JSON.stringify(saved.document.rates) === JSON.stringify(doc.rates) && JSON.stringify(saved.document.transitions) === JSON.stringify(doc.transitions);

    // ----------------------------------------------------------- report
    const signIn = scripts.filter((s) => s.phase === "sign-in");
    const editorScripts = scripts.filter((s) => s.phase !== "sign-in");
    const sum = (xs: { raw: number; gzip: number }[]) => xs.reduce((a, s) => ({ raw: a.raw + s.raw, gzip: a.gzip + s.gzip }), { raw: 0, gzip: 0 });
    const signInTotal = sum(signIn);
    const editorTotal = sum(editorScripts);

    console.log("");
    console.log(`Stagewright editor bench — ${new Date().toISOString()}`);
    console.log(`machine: ${os.cpus().length} × ${os.cpus()[0]?.model ?? "?"}, Node ${process.version}; load average before ${load.map((x) => x.toFixed(2)).join(" ")}, after ${os.loadavg().map((x) => x.toFixed(2)).join(" ")}`);
    console.log(`document: ${stages} stages, ${arrows} arrows, ${rateCount} vital rates; λ on opening ${openingLambda}`);
    console.log("");
    console.log(`Edit → λ painted (keystroke to the frame showing the new λ, debounce included); budget ≤ ${EDIT_BUDGET_MS} ms for median and p90`);
    if (CPU_PROFILE) console.log("  (the CPU profiler ran during the edits: times are a little higher than without it)");
    let allPass = true;
    for (const s of [rates, diagram]) {
      const { line, pass } = summarise(s);
      allPass &&= pass;
      console.log(`  ${s.label}`);
      console.log(`    ${line}   ${pass ? "PASS" : "MISS"}`);
      console.log(`    warm-up edits (not counted): ${s.warmUp.map((t) => ms(t.frame - t.edit).trim()).join(", ")}`);
      for (const l of breakdown(s)) console.log(l);
      console.log(`    λ checked against analyzeMatrix to 4 decimals: ${s.timings.length + s.warmUp.length - s.mismatches.length}/${s.timings.length + s.warmUp.length} agree`);
      for (const mm of s.mismatches) console.log(`      MISMATCH ${mm}`);
      for (const l of s.profile) console.log(l);
    }
    console.log(`  edit → λ overall: ${allPass ? "PASS" : "MISS"}`);
    console.log(
      `  server share on its own (worker thread, warm): parse + validate + analyse + serialise ${median(serverTimes).toFixed(1)} ms median (${serverTimes.length} runs); response JSON ${kB(responseBytes)}`,
    );
    console.log(
      stuck.length === 0
        ? "  every document sent was first analysed in a worker within 10 s"
        : `  documents NOT sent because their analysis did not finish within 10 s: ${stuck.length} (${stuck.slice(0, 5).join("; ")})`,
    );
    console.log(`  saved document after the edits matches the bench's copy: ${savedMatches ? "yes" : "NO"} (version ${saved.version})`);
    console.log("");
    const compressed = [...encodings].filter((e) => e !== "none");
    console.log(
      compressed.length > 0
        ? `JavaScript: the server sent it with content-encoding ${compressed.join(", ")}; sizes below are zlib gzip level ${GZIP_LEVEL} of the files.`
        : `JavaScript: the server sends it uncompressed (no content-encoding); gzip sizes are computed here with zlib level ${GZIP_LEVEL} from the files served.`,
    );
    console.log(`  sign-in page, fresh profile: ${signIn.length} files, ${kB(signInTotal.raw)} raw, ${kB(signInTotal.gzip)} gzip; budget ${kB(SIGN_IN_JS_BUDGET_BYTES)} gzip  ${signInTotal.gzip <= SIGN_IN_JS_BUDGET_BYTES ? "PASS" : "MISS"}`);
    for (const s of [...signIn].sort((a, b) => b.gzip - a.gzip)) console.log(`    ${s.file.padEnd(48)}${kB(s.gzip).padStart(10)} gzip`);
    console.log(`  loaded lazily by the editor and its tabs (beyond the sign-in page's): ${editorScripts.length} files, ${kB(editorTotal.raw)} raw, ${kB(editorTotal.gzip)} gzip`);
    for (const ph of [...new Set(editorScripts.map((s) => s.phase))]) {
      const inPhase = editorScripts.filter((s) => s.phase === ph);
      console.log(`    ${ph}: ${kB(sum(inPhase).gzip)} gzip`);
      for (const s of [...inPhase].sort((a, b) => b.gzip - a.gzip)) console.log(`      ${s.file.padEnd(46)}${kB(s.gzip).padStart(10)} gzip`);
    }
    if (pageErrors.length > 0) {
      console.log("");
      console.log(`Errors on the page: ${pageErrors.join(" | ")}`);
    }
    failed = rates.mismatches.length + diagram.mismatches.length > 0 || !savedMatches || pageErrors.length > 0;
  } catch (error) {
    failed = true;
    console.error(error);
  } finally {
    await browser.close();
    await server.close();
    await probe.close();
    stopCluster();
  }
  process.exitCode = failed ? 1 : 0;
}

if (!isMainThread && parentPort) await analysisWorker(parentPort);
else if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) await main();
