// Load benchmark of the web server on loopback with autocannon.
// Run: npm run bench:load [-- --duration=30 --runs=3 --connections=10]
//
// The server runs as production runs it (`node --import tsx server/index.ts`,
// NODE_ENV=production) in a process of its own, against a PostgreSQL cluster
// of the bench's own ("pg-bench-load", a free loopback port, or
// STAGEWRIGHT_BENCH_PG_PORT), freshly migrated. Scenarios, each `--runs`
// times for `--duration` seconds, reported as the median of the runs:
//   analyze  POST /api/v1/analyze, a 10-stage matrix with its fertility part, Bearer token.
//            Target: ≥ 1,500 requests/s with p99 ≤ 50 ms and no errors.
//   read     GET /api/v1/life-cycles/:id, the editor's read of a life cycle (a
//            10-stage document), with a session cookie as the web client sends it.
//   mixed    readers (as above) while 8 writers save the same life cycle as fast as
//            they can, each with the version it last saw. Every save must land (200)
//            or be refused as stale (409); afterwards the stored life cycle must be
//            the last save that landed, with one activity row per landed save.
// The machine is shared: the load average is printed beside every figure.
// Exit code 1 only when a request failed or the mixed scenario's state is wrong.
import { spawn, type ChildProcess } from "node:child_process";
import { createHmac, randomBytes } from "node:crypto";
import fs from "node:fs";
import net from "node:net";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import autocannon from "autocannon";
import { and, eq } from "drizzle-orm";
import { analyzeMatrix } from "../shared/demography/index";
import { LIFE_CYCLE_SCHEMA_VERSION, type LifeCycle } from "../shared/lifecycle/index";
import { connect } from "../server/db/client";
import { auditEvents, lifeCycles, memberships, sessions, studies, users } from "../server/db/schema";
import { createApiToken } from "../server/services/api-tokens";

const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const arg = (name: string, fallback: number) => Number(process.argv.find((a) => a.startsWith(`--${name}=`))?.split("=")[1] ?? fallback);
const DURATION = arg("duration", 30);
const RUNS = arg("runs", 3);
const CONNECTIONS = arg("connections", 10);
/** `--processes=N`: web server processes (WEB_PROCESSES); production's default is one per core. */
const PROCESSES = arg("processes", os.availableParallelism());
const WRITERS = 8;
const SESSION_SECRET = randomBytes(24).toString("hex");
/** `--cpu-prof`: the server writes a V8 CPU profile to the temp folder on exit (open it in DevTools); its self time per file is listed. */
const CPU_PROFILE = process.argv.includes("--cpu-prof");
const PROFILE_DIR = path.join(os.tmpdir(), "sw-load-profile");
/** `--only=analyze,read,mixed`: run only those scenarios. */
const ONLY = new Set((process.argv.find((a) => a.startsWith("--only="))?.slice("--only=".length) ?? "analyze,read,mixed").split(","));
const TARGET_RPS = 1500;
const TARGET_P99_MS = 50;
let server: ChildProcess | undefined;

interface SetupHelpers {
  ensurePostgres(): string;
  startCluster(bin: string, name: string, port: number, options?: { durable?: boolean }): { stop: () => void };
  ensureDatabase(bin: string, port: number, name: string, options?: { fresh?: boolean }): string;
  onShutdown(fn: () => void): (code?: number) => void;
  log(message: string): void;
}

async function freePort(): Promise<number> {
  const srv = net.createServer();
  await new Promise<void>((resolve) => srv.listen(0, "127.0.0.1", resolve));
  const port = (srv.address() as net.AddressInfo).port;
  await new Promise<void>((resolve) => srv.close(() => resolve()));
  return port;
}

const load = () => os.loadavg().map((x) => x.toFixed(1)).join(" / ");

/** An invented 10-stage life cycle: juveniles 1–3 grow on, stages 4–10 stay or grow and reproduce into stage 1. */
function tenStageLifeCycle(name = "Bench: 10 stages"): LifeCycle {
  const n = 10;
  const stages = Array.from({ length: n }, (_, i) => ({ id: `st_${i + 1}`, name: `Stage ${i + 1}`, position: { x: 200 * i, y: 0 } }));
  const rates = [
    ...Array.from({ length: n }, (_, i) => ({ id: `vr_s${i + 1}`, name: `s_${i + 1}`, value: Math.round((0.4 + 0.05 * i) * 1000) / 1000 })),
    ...Array.from({ length: n }, (_, i) => ({ id: `vr_g${i + 1}`, name: `g_${i + 1}`, value: Math.round((0.6 - 0.04 * i) * 1000) / 1000 })),
    { id: "vr_f", name: "f", value: 0.9 },
  ];
  const transitions: LifeCycle["transitions"] = [];
  for (let i = 1; i <= n; i++) {
    if (i > 1) transitions.push({ id: `tr_s${i}`, from: `st_${i}`, to: `st_${i}`, kind: "stasis", rate: i < n ? `s_${i} * (1 - g_${i})` : `s_${i}` });
    if (i < n) transitions.push({ id: `tr_g${i}`, from: `st_${i}`, to: `st_${i + 1}`, kind: "growth", rate: i === 1 ? `s_1` : `s_${i} * g_${i}` });
    if (i >= 4) transitions.push({ id: `tr_f${i}`, from: `st_${i}`, to: "st_1", kind: "reproduction", rate: `f * ${i - 3}` });
  }
  return { stagewright: LIFE_CYCLE_SCHEMA_VERSION, name, census: "pre-breeding", timeStepUnit: "year", stages, rates, transitions };
}

/** The 10-stage matrix of that life cycle, with its F part, for POST /analyze. */
function tenStageMatrix(): { matrix: number[][]; fertility: number[][] } {
  const n = 10;
  const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  const F = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let i = 1; i <= n; i++) {
    const s = 0.4 + 0.05 * (i - 1);
    const g = 0.6 - 0.04 * (i - 1);
    if (i > 1) A[i - 1]![i - 1] = i < n ? s * (1 - g) : s;
    if (i < n) A[i]![i - 1] = i === 1 ? s : s * g;
    if (i >= 4) {
      A[0]![i - 1] = 0.9 * (i - 3);
      F[0]![i - 1] = 0.9 * (i - 3);
    }
  }
  return { matrix: A, fertility: F };
}

function startServer(databaseUrl: string, port: number): Promise<ChildProcess> {
  const child = spawn(process.execPath, [...(CPU_PROFILE ? ["--cpu-prof", "--cpu-prof-dir", PROFILE_DIR] : []), "--import", "tsx", "server/index.ts"], {
    cwd: root,
    env: { ...process.env, NODE_ENV: "production", DATABASE_URL: databaseUrl, PORT: String(port), HOST: "127.0.0.1", SESSION_SECRET, MAIL_OUTBOX: "off", STATIC_DIR: "/nonexistent", WEB_PROCESSES: String(PROCESSES) },
    stdio: ["ignore", "pipe", "inherit"],
  });
  return new Promise((resolve, reject) => {
    let out = "";
    child.stdout!.on("data", (d) => {
      out += d;
      if (out.includes("Stagewright web server on")) resolve(child);
    });
    child.once("exit", (code) => reject(new Error(`The server exited (${code}) before listening:\n${out}`)));
  });
}

interface Figures {
  rps: number;
  p50: number;
  p99: number;
  errors: number;
  non2xx: number;
  requests: number;
  load: string;
  /** Server CPU time per request (all its processes), ms: the figure least disturbed by other work on the machine. */
  serverCpuMs: number;
  /** The load generator's own CPU per request, ms: on 2 cores it competes with the server. */
  clientCpuMs: number;
}

/** CPU seconds (user + system) used so far by a process and all its descendants that are still running (Linux /proc). */
function treeCpuSeconds(pid: number): number {
  const ticks = 100; // USER_HZ on Linux
  let total = 0;
  const stat = (p: number) => {
    try {
      const fields = fs.readFileSync(`/proc/${p}/stat`, "utf8").split(") ")[1]!.split(" ");
      return { ppid: Number(fields[1]), cpu: (Number(fields[11]) + Number(fields[12])) / ticks };
    } catch {
      return null;
    }
  };
  const all = fs.readdirSync("/proc").filter((d) => /^\d+$/.test(d)).map(Number);
  const children = new Map<number, number[]>();
  for (const p of all) {
    const s = stat(p);
    if (s) children.set(s.ppid, [...(children.get(s.ppid) ?? []), p]);
  }
  const walk = (p: number) => {
    total += stat(p)?.cpu ?? 0;
    for (const c of children.get(p) ?? []) walk(c);
  };
  walk(pid);
  return total;
}

async function cannon(opts: autocannon.Options): Promise<Figures> {
  const serverCpu = treeCpuSeconds(server!.pid!);
  const ownCpu = process.cpuUsage();
  const r = await autocannon({ connections: CONNECTIONS, duration: DURATION, ...opts });
  const own = process.cpuUsage(ownCpu);
  return {
    rps: r.requests.average,
    p50: r.latency.p50,
    p99: r.latency.p99,
    errors: r.errors + r.timeouts,
    non2xx: r.non2xx,
    requests: r.requests.total,
    load: load(),
    serverCpuMs: ((treeCpuSeconds(server!.pid!) - serverCpu) * 1000) / r.requests.total,
    clientCpuMs: (own.user + own.system) / 1000 / r.requests.total,
  };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
function report(name: string, runs: Figures[]) {
  for (const [i, f] of runs.entries()) {
    console.log(`  ${name} run ${i + 1}: ${f.rps.toFixed(0)} req/s, p50 ${f.p50} ms, p99 ${f.p99} ms, ${f.requests} requests, errors ${f.errors}, non-2xx ${f.non2xx}; CPU per request: server ${f.serverCpuMs.toFixed(2)} ms, autocannon ${f.clientCpuMs.toFixed(2)} ms (load average ${f.load})`);
  }
  const m = { rps: median(runs.map((r) => r.rps)), p50: median(runs.map((r) => r.p50)), p99: median(runs.map((r) => r.p99)) };
  console.log(`  ${name} median of ${runs.length}: ${m.rps.toFixed(0)} req/s, p50 ${m.p50} ms, p99 ${m.p99} ms`);
  return m;
}

async function main() {
  const setup = (await import(path.join(root, "scripts/lib/setup.mjs"))) as SetupHelpers;
  const bin = setup.ensurePostgres();
  const pgPort = Number(process.env.STAGEWRIGHT_BENCH_PG_PORT ?? (await freePort()));
  const cluster = setup.startCluster(bin, "pg-bench-load", pgPort, { durable: false });
  setup.onShutdown(() => {
    server?.kill("SIGTERM");
    cluster.stop();
  });
  const databaseUrl = setup.ensureDatabase(bin, pgPort, "stagewright_load", { fresh: true });
  const { runMigrations } = await import("../server/db/migrate");
  await runMigrations(databaseUrl);

  const database = connect(databaseUrl, { max: 4 });
  const db = database.db;
  const [user] = await db.insert(users).values({ email: "bench@example.org", name: "Bench", passwordHash: "x" }).returning();
  const [study] = await db.insert(studies).values({ name: "Load bench", createdBy: user!.id }).returning();
  await db.insert(memberships).values({ studyId: study!.id, userId: user!.id, role: "owner" });
  const document = tenStageLifeCycle();
  const [lc] = await db.insert(lifeCycles).values({ studyId: study!.id, name: document.name, document, schemaVersion: LIFE_CYCLE_SCHEMA_VERSION, createdBy: user!.id, updatedBy: user!.id }).returning();
  const { token } = await createApiToken(db, user!.id, "load bench");
  // A web session as express-session stores one, signed with the server's secret.
  const sid = randomBytes(24).toString("base64url");
  const expires = new Date(Date.now() + 86_400_000);
  await db.insert(sessions).values({ sid, sess: { cookie: { originalMaxAge: 86_400_000, expires: expires.toISOString(), httpOnly: true, path: "/", sameSite: "lax" }, passport: { user: user!.id } }, expire: expires });
  const cookie = `sw_session=${encodeURIComponent(`s:${sid}.${createHmac("sha256", SESSION_SECRET).update(sid).digest("base64").replace(/=+$/, "")}`)}`;

  const port = await freePort();
  server = await startServer(databaseUrl, port);
  const base = `http://127.0.0.1:${port}`;
  const { matrix, fertility } = tenStageMatrix();
  const analyzeBody = JSON.stringify({ matrix, fertility });
  const expected = analyzeMatrix({ A: matrix }).lambda;
  // Check the answers before timing them.
  const probe = await fetch(`${base}/api/v1/analyze`, { method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": "application/json" }, body: analyzeBody });
  const probeBody = (await probe.json()) as { lambda: number };
  if (probe.status !== 200 || Math.abs(probeBody.lambda - expected) > 1e-12) throw new Error(`POST /analyze answered ${probe.status} λ=${probeBody.lambda}, expected λ=${expected}`);
  const read = await fetch(`${base}/api/v1/life-cycles/${lc!.id}`, { headers: { cookie } });
  if (read.status !== 200) throw new Error(`The editor's read answered ${read.status}`);
  const readBytes = (await read.arrayBuffer()).byteLength;
  const analyzeBytes = JSON.stringify(probeBody).length;

  console.log(`Load bench: ${os.cpus().length} × ${os.cpus()[0]?.model.trim()}, Node ${process.version}; ${PROCESSES} web server process${PROCESSES > 1 ? "es" : ""}; ${RUNS} runs × ${DURATION} s, ${CONNECTIONS} connections; load average before: ${load()}`);
  console.log(`POST /api/v1/analyze (10 stages, Bearer token; answer ${analyzeBytes} bytes, λ = ${expected.toFixed(4)}):`);
  const analyzeRuns: Figures[] = [];
  for (let i = 0; i < (ONLY.has("analyze") ? RUNS : 0); i++) {
    analyzeRuns.push(await cannon({ url: `${base}/api/v1/analyze`, method: "POST", headers: { authorization: `Bearer ${token}`, "content-type": "application/json" }, body: analyzeBody }));
  }
  if (analyzeRuns.length) {
    const a = report("analyze", analyzeRuns);
    console.log(`  target ≥ ${TARGET_RPS} req/s and p99 ≤ ${TARGET_P99_MS} ms: ${a.rps >= TARGET_RPS && a.p99 <= TARGET_P99_MS ? "MET" : "MISSED"}`);
  }

  console.log(`GET /api/v1/life-cycles/:id (the editor's read, session cookie; answer ${readBytes} bytes):`);
  const readRuns: Figures[] = [];
  for (let i = 0; i < (ONLY.has("read") ? RUNS : 0); i++) readRuns.push(await cannon({ url: `${base}/api/v1/life-cycles/${lc!.id}`, headers: { cookie } }));
  if (readRuns.length) report("read", readRuns);

  let mixedFailures = 0;
  if (ONLY.has("mixed")) {
    console.log(`Mixed: readers on ${CONNECTIONS} connections while ${WRITERS} writers save the same life cycle (${DURATION} s):`);
    mixedFailures = (await mixed(base, token, cookie, lc!.id, database)).failures;
  }

  const failed = [...analyzeRuns, ...readRuns].some((f) => f.errors > 0 || f.non2xx > 0) || mixedFailures > 0;
  console.log(`load average after: ${load()}`);
  await database.pool.end();
  const exited = new Promise((resolve) => server!.once("exit", resolve));
  server.kill("SIGTERM");
  await exited;
  server = undefined;
  cluster.stop();
  if (CPU_PROFILE) summariseProfile();
  process.exitCode = failed ? 1 : 0;
}

async function mixed(base: string, token: string, cookie: string, lifeCycleId: string, database: ReturnType<typeof connect>): Promise<{ failures: number }> {
  const headers = { authorization: `Bearer ${token}`, "content-type": "application/json" };
  const landed: { version: number; name: string; at: number }[] = [];
  let stale = 0;
  let other = 0;
  const latencies: number[] = [];
  const until = Date.now() + DURATION * 1000;
  const [start] = await database.db.select().from(lifeCycles).where(eq(lifeCycles.id, lifeCycleId));
  const startVersion = start!.version;
  const writer = async (w: number) => {
    let version = startVersion;
    for (let k = 0; Date.now() < until; k++) {
      const name = `Bench: writer ${w} save ${k}`;
      const t = performance.now();
      const res = await fetch(`${base}/api/v1/life-cycles/${lifeCycleId}`, { method: "PUT", headers, body: JSON.stringify({ version, document: tenStageLifeCycle(name) }) });
      const body = (await res.json()) as { version?: number; current?: { version: number } };
      latencies.push(performance.now() - t);
      if (res.status === 200) {
        landed.push({ version: body.version!, name, at: Date.now() });
        version = body.version!;
      } else if (res.status === 409) {
        stale++;
        version = body.current!.version;
      } else {
        other++;
        console.log(`  writer ${w}: unexpected ${res.status} ${JSON.stringify(body).slice(0, 200)}`);
      }
    }
  };
  const [readers] = await Promise.all([
    autocannon({ url: `${base}/api/v1/life-cycles/${lifeCycleId}`, headers: { cookie }, connections: CONNECTIONS, duration: DURATION }),
    Promise.all(Array.from({ length: WRITERS }, (_, w) => writer(w))),
  ]);
  let failures = other + readers.errors + readers.timeouts + readers.non2xx;
  landed.sort((x, y) => x.version - y.version);
  const last = landed[landed.length - 1];
  const [final] = await database.db.select().from(lifeCycles).where(eq(lifeCycles.id, lifeCycleId));
  const events = await database.db.select().from(auditEvents).where(and(eq(auditEvents.action, "life_cycle.updated")));
  const versionsConsecutive = landed.every((l, i) => l.version === startVersion + i + 1);
  const finalIsLast = !!last && final!.version === last.version && (final!.document as LifeCycle).name === last.name;
  const oneEventEach = events.length === landed.length;
  if (!versionsConsecutive || !finalIsLast || !oneEventEach) failures++;
  latencies.sort((x, y) => x - y);
  console.log(
    `  saves: ${landed.length} landed, ${stale} refused as stale (409), ${other} other; ${(landed.length / DURATION).toFixed(0)} landed saves/s; save p50 ${latencies[Math.floor(latencies.length / 2)]?.toFixed(0)} ms, p99 ${latencies[Math.floor(latencies.length * 0.99)]?.toFixed(0)} ms`,
  );
  console.log(`  reads meanwhile: ${readers.requests.average.toFixed(0)} req/s, p50 ${readers.latency.p50} ms, p99 ${readers.latency.p99} ms, errors ${readers.errors + readers.timeouts}, non-2xx ${readers.non2xx} (load average ${load()})`);
  console.log(`  landed versions consecutive without gaps or repeats: ${versionsConsecutive}; stored life cycle = last landed save: ${finalIsLast}; one activity row per landed save: ${oneEventEach}`);
  return { failures };
}

/** Self time by source file (and the heaviest functions) of the newest profile in PROFILE_DIR. */
function summariseProfile() {
  const files = fs.readdirSync(PROFILE_DIR).filter((f) => f.endsWith(".cpuprofile")).map((f) => path.join(PROFILE_DIR, f));
  // The main thread writes the largest profile (tsx's loader thread writes one too).
  const newest = files.sort((a, b) => fs.statSync(b).size - fs.statSync(a).size)[0];
  if (!newest) return;
  type Node = { id: number; callFrame: { functionName: string; url: string; lineNumber: number }; hitCount?: number };
  const profile = JSON.parse(fs.readFileSync(newest, "utf8")) as { nodes: Node[]; samples: number[]; timeDeltas: number[] };
  const byId = new Map(profile.nodes.map((n) => [n.id, n]));
  const selfByFile = new Map<string, number>();
  const selfByFunction = new Map<string, number>();
  profile.samples.forEach((id, i) => {
    const n = byId.get(id)!;
    const dt = profile.timeDeltas[i] ?? 0;
    const file = n.callFrame.url.replace(/^file:\/\//, "").replace(root + "/", "") || `(${n.callFrame.functionName || "native"})`;
    const short = file.includes("node_modules/") ? file.replace(/.*node_modules\/((@[^/]+\/)?[^/]+).*/, "$1") : file;
    selfByFile.set(short, (selfByFile.get(short) ?? 0) + dt);
    const fn = `${n.callFrame.functionName || "(anonymous)"} ${short}:${n.callFrame.lineNumber + 1}`;
    selfByFunction.set(fn, (selfByFunction.get(fn) ?? 0) + dt);
  });
  const total = [...selfByFile.values()].reduce((a, b) => a + b, 0);
  console.log(`CPU profile ${newest} (${(total / 1e6).toFixed(1)} s sampled), self time by package or file:`);
  for (const [f, t] of [...selfByFile.entries()].sort((a, b) => b[1] - a[1]).slice(0, 25)) console.log(`  ${((100 * t) / total).toFixed(1).padStart(5)} %  ${f}`);
  console.log("heaviest functions:");
  for (const [f, t] of [...selfByFunction.entries()].sort((a, b) => b[1] - a[1]).slice(0, 20)) console.log(`  ${((100 * t) / total).toFixed(1).padStart(5)} %  ${f}`);
}

main().catch((err) => {
  console.error(err);
  process.exitCode = 1;
});
