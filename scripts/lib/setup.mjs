// Dependency-free set-up shared by `npm start` and `npm test`: it runs before
// node_modules exists, so it may import nothing but Node's own modules.
import { execFileSync, spawn, spawnSync } from "node:child_process";
import { createHash } from "node:crypto";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";

export const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../..");
const isRoot = process.getuid?.() === 0;

export const log = (msg) => console.log(`\x1b[36m[stagewright]\x1b[0m ${msg}`);
export const fail = (msg) => {
  const e = new Error(msg);
  e.setupFailure = true;
  return e;
};

function run(cmd, args, opts = {}) {
  const r = spawnSync(cmd, args, { stdio: opts.quiet ? "pipe" : "inherit", cwd: root, env: { ...process.env, ...opts.env }, encoding: "utf8" });
  if (r.status !== 0 && !opts.allowFail) {
    throw fail(`${cmd} ${args.join(" ")} failed (exit ${r.status})${opts.quiet ? `:\n${r.stderr || r.stdout}` : ""}`);
  }
  return r;
}

// ---------------------------------------------------------------- npm ci
const lockHash = () => createHash("sha256").update(fs.readFileSync(path.join(root, "package-lock.json"))).digest("hex");
const stampFile = path.join(root, "node_modules", ".stagewright-lock");

/** Runs `npm ci` when node_modules is missing or was installed from another lock file. */
export function ensureDependencies() {
  const want = lockHash();
  if (fs.existsSync(stampFile) && fs.readFileSync(stampFile, "utf8") === want) return;
  log("Installing dependencies (npm ci)…");
  run("npm", ["ci", "--no-audit", "--no-fund"]);
  fs.writeFileSync(stampFile, want);
}

// ---------------------------------------------------------------- Debian packages
let aptUpdated = false;
function aptInstall(pkg, why) {
  if (!isRoot) throw fail(`${why} is not installed. Install the Debian package '${pkg}' (sudo apt-get install -y ${pkg}) and run this again.`);
  log(`Installing ${pkg} from Debian's packages (${why} is absent)…`);
  if (!aptUpdated) {
    run("apt-get", ["update", "-qq"]);
    aptUpdated = true;
  }
  run("apt-get", ["install", "-y", "-qq", "--no-install-recommends", pkg], { env: { DEBIAN_FRONTEND: "noninteractive" } });
}

export const CHROMIUM = process.env.STAGEWRIGHT_CHROMIUM ?? "/usr/bin/chromium";
export function ensureChromium() {
  if (fs.existsSync(CHROMIUM)) return CHROMIUM;
  aptInstall("chromium", "Chromium (for the browser tests)");
  if (!fs.existsSync(CHROMIUM)) throw fail(`Chromium is still missing at ${CHROMIUM}.`);
  return CHROMIUM;
}

// ---------------------------------------------------------------- PostgreSQL
function findPgBin() {
  const candidates = [];
  const r = spawnSync("pg_config", ["--bindir"], { encoding: "utf8" });
  if (r.status === 0) candidates.push(r.stdout.trim());
  const base = "/usr/lib/postgresql";
  if (fs.existsSync(base)) {
    for (const v of fs.readdirSync(base).sort((a, b) => Number(b) - Number(a))) candidates.push(path.join(base, v, "bin"));
  }
  return candidates.find((d) => fs.existsSync(path.join(d, "initdb")) && fs.existsSync(path.join(d, "pg_ctl")));
}

export function ensurePostgres() {
  let bin = findPgBin();
  if (!bin) {
    aptInstall("postgresql", "PostgreSQL");
    bin = findPgBin();
  }
  if (!bin) throw fail("PostgreSQL's server binaries (initdb, pg_ctl) were not found after installing.");
  if (isRoot && spawnSync("id", ["-u", "postgres"]).status !== 0) {
    run("useradd", ["--system", "--home-dir", "/var/lib/postgresql", "--shell", "/bin/bash", "postgres"]);
  }
  return bin;
}

/** As root, PostgreSQL runs as `postgres`: it must be able to reach the data folder. */
function asDbUser(cmd, args, opts = {}) {
  return isRoot ? run("runuser", ["-u", "postgres", "--", cmd, ...args], opts) : run(cmd, args, opts);
}

function postgresCanReach(dir) {
  return !isRoot || spawnSync("runuser", ["-u", "postgres", "--", "test", "-x", dir]).status === 0;
}

/**
 * The cluster's folder: `.data/<name>` in the checkout when the postgres user can
 * reach it; otherwise (e.g. a checkout inside root's home) a per-checkout folder
 * under /var/lib/stagewright.
 */
export function clusterDir(name) {
  const local = path.join(root, ".data");
  fs.mkdirSync(local, { recursive: true });
  if (postgresCanReach(local)) return path.join(local, name);
  const id = createHash("sha256").update(root).digest("hex").slice(0, 12);
  return path.join("/var/lib/stagewright", id, name);
}

export function clusterPaths(name) {
  const dir = clusterDir(name);
  return { dir, data: path.join(dir, "data"), socket: path.join(dir, "socket"), log: path.join(dir, "server.log") };
}

/** Creates (first time) and starts a cluster on 127.0.0.1:port. Returns a stop function (a no-op if it was already running). */
export function startCluster(bin, name, port, { durable = true } = {}) {
  const p = clusterPaths(name);
  fs.mkdirSync(p.dir, { recursive: true });
  if (isRoot) execFileSync("chown", ["postgres:postgres", p.dir]);
  fs.chmodSync(p.dir, 0o700);
  if (!fs.existsSync(path.join(p.data, "PG_VERSION"))) {
    log(`Creating a PostgreSQL cluster in ${p.data}…`);
    asDbUser(path.join(bin, "initdb"), ["-D", p.data, "-U", "postgres", "--auth=trust", "--encoding=UTF8", "--locale=C.UTF-8"], { quiet: true });
  }
  if (!fs.existsSync(p.socket)) {
    fs.mkdirSync(p.socket);
    if (isRoot) execFileSync("chown", ["postgres:postgres", p.socket]);
  }
  const status = asDbUser(path.join(bin, "pg_ctl"), ["-D", p.data, "status"], { quiet: true, allowFail: true });
  if (status.status === 0) {
    log(`PostgreSQL (${name}) is already running; using it.`);
    return { ...p, port, stop: () => {} };
  }
  const opts = `-c listen_addresses=127.0.0.1 -p ${port} -k ${p.socket} -c max_connections=200 -c fsync=${durable ? "on" : "off"}`;
  const r = asDbUser(path.join(bin, "pg_ctl"), ["-D", p.data, "-l", p.log, "-w", "-t", "60", "-o", opts, "start"], { quiet: true, allowFail: true });
  if (r.status !== 0) {
    const tail = fs.existsSync(p.log) ? fs.readFileSync(p.log, "utf8").split("\n").slice(-15).join("\n") : "";
    throw fail(`PostgreSQL did not start on 127.0.0.1:${port} (is the port taken? set STAGEWRIGHT_PG_PORT).\n${tail}`);
  }
  log(`PostgreSQL (${name}) listening on 127.0.0.1:${port}.`);
  return { ...p, port, stop: () => stopCluster(bin, name) };
}

export function stopCluster(bin, name) {
  const p = clusterPaths(name);
  if (!fs.existsSync(path.join(p.data, "PG_VERSION"))) return false;
  const r = asDbUser(path.join(bin, "pg_ctl"), ["-D", p.data, "-m", "fast", "-w", "stop"], { quiet: true, allowFail: true });
  if (r.status === 0) log(`PostgreSQL (${name}) stopped.`);
  return r.status === 0;
}

export function psql(bin, port, sql, database = "postgres") {
  return run(path.join(bin, "psql"), ["-h", "127.0.0.1", "-p", String(port), "-U", "postgres", "-d", database, "-v", "ON_ERROR_STOP=1", "-tAc", sql], { quiet: true }).stdout.trim();
}

export function ensureDatabase(bin, port, name, { fresh = false, template } = {}) {
  if (fresh) psql(bin, port, `DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
  const exists = psql(bin, port, `SELECT 1 FROM pg_database WHERE datname = '${name}'`) === "1";
  if (!exists) psql(bin, port, `CREATE DATABASE "${name}"${template ? ` TEMPLATE "${template}"` : ""}`);
  return `postgres://postgres@127.0.0.1:${port}/${name}`;
}

// ---------------------------------------------------------------- Node helpers
const TSX = ["--import", "tsx"];
export function runTs(file, env = {}) {
  run(process.execPath, [...TSX, file], { env });
}
export function spawnTs(file, env = {}, name = file, nodeFlags = []) {
  const child = spawn(process.execPath, [...nodeFlags, ...TSX, file], { cwd: root, env: { ...process.env, ...env }, stdio: "inherit" });
  child.label = name;
  return child;
}
export function runBin(pkgBin, args, env = {}) {
  return run(process.execPath, [path.join(root, "node_modules", pkgBin), ...args], { env, allowFail: true });
}

/** Builds the client when dist/ is missing or older than any client source. */
export function ensureClientBuild({ force = false, outDir = "dist" } = {}) {
  const stamp = path.resolve(root, outDir, "index.html");
  const newest = (p) => {
    const st = fs.statSync(p);
    if (!st.isDirectory()) return st.mtimeMs;
    return Math.max(st.mtimeMs, ...fs.readdirSync(p).map((f) => newest(path.join(p, f))));
  };
  const inputs = ["src", "shared", "index.html", "vite.config.ts", "tailwind.config.ts", "package-lock.json"].map((f) => path.join(root, f)).filter((f) => fs.existsSync(f));
  if (!force && fs.existsSync(stamp) && fs.statSync(stamp).mtimeMs >= Math.max(...inputs.map(newest))) return true;
  log("Building the client (vite build)…");
  return runBin("vite/bin/vite.js", ["build", "--logLevel", "warn", "--outDir", outDir, "--emptyOutDir"]).status === 0;
}

/** Stops what we started, once, on normal exit, Ctrl-C, SIGTERM or a crash. */
export function onShutdown(fn) {
  let done = false;
  const once = (code) => {
    if (done) return;
    done = true;
    try {
      fn();
    } catch (err) {
      console.error(err);
    }
    if (code !== undefined) process.exit(code);
  };
  process.on("exit", () => once());
  process.on("SIGINT", () => once(130));
  process.on("SIGTERM", () => once(143));
  process.on("uncaughtException", (err) => {
    console.error(err.setupFailure ? `\n${err.message}` : err);
    once(1);
  });
  return once;
}

export const tmpDir = os.tmpdir();
