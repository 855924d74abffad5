// `npm start`: everything from a fresh machine to the running product with its demo.
// `npm run dev` (`--dev`): the same, with Vite's dev server and hot reload in front of the API.
import { spawn } from "node:child_process";
import path from "node:path";
import {
  ensureClientBuild,
  ensureDatabase,
  ensureDependencies,
  ensurePostgres,
  log,
  onShutdown,
  root,
  runTs,
  spawnTs,
  startCluster,
} from "./lib/setup.mjs";

const PG_PORT = Number(process.env.STAGEWRIGHT_PG_PORT ?? 54329);
const PORT = Number(process.env.PORT ?? 3000);
const SMTP_PORT = Number(process.env.SMTP_PORT ?? 2525);
const DEV = process.argv.includes("--dev");
const PUBLIC_URL = process.env.PUBLIC_URL ?? `http://127.0.0.1:${DEV ? 5173 : PORT}`;

const children = [];
let cluster;
const shutdown = onShutdown(() => {
  for (const c of children) if (c.exitCode === null) c.kill("SIGTERM");
  cluster?.stop();
});

ensureDependencies();
const bin = ensurePostgres();
cluster = startCluster(bin, "pg", PG_PORT);
const DATABASE_URL = ensureDatabase(bin, PG_PORT, "stagewright");
const env = { DATABASE_URL, PORT: String(PORT), SMTP_PORT: String(SMTP_PORT), PUBLIC_URL, NODE_ENV: process.env.NODE_ENV ?? "development" };

log("Applying migrations…");
runTs("server/db/migrate.ts", env);
log("Seeding the demo Study…");
runTs("server/seed.ts", env);
if (!DEV && !ensureClientBuild()) throw new Error("The client build failed.");
if (DEV) {
  const vite = spawn(process.execPath, [path.join(root, "node_modules/vite/bin/vite.js"), "--host", "127.0.0.1", "--port", "5173", "--strictPort"], {
    cwd: root,
    env: { ...process.env, STAGEWRIGHT_PORT: String(PORT) },
    stdio: "inherit",
  });
  vite.label = "Vite dev server";
  children.push(vite);
}

for (const child of children) watchExit(child);
for (const [file, name] of [["server/mail/fake-smtp.ts", "mail fake"], ["server/worker.ts", "worker"], ["server/index.ts", "web server"]]) {
  const child = spawnTs(file, env, name, DEV && name === "web server" ? ["--watch"] : []);
  children.push(child);
  watchExit(child);
}

function watchExit(child) {
  child.on("exit", (code, signal) => {
    if (signal === "SIGTERM") return;
    console.error(`The ${child.label} stopped (${signal ?? `exit ${code}`}); stopping everything.`);
    shutdown(1);
  });
}

log(`
  Stagewright is starting on ${PUBLIC_URL}

  Demo sign-ins (password for all three: stagewright-demo):
    owner     olwen.marsh@example.org
    editor    ellis.reed@example.org
    reviewer  rowan.vale@example.org

  Caught e-mail: ${PUBLIC_URL}/mail   ·   Ctrl-C stops everything, PostgreSQL included.
`);
