import { ClusterMemoryStorePrimary } from "@express-rate-limit/cluster-memory-store";
import cluster from "node:cluster";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createApp } from "./app";
import { loadConfig, type Config } from "./config";
import { connect } from "./db/client";
import { createMailer } from "./mail/mailer";
import { createJobSender } from "./runs/queue";
import { RUN_KINDS } from "./runs/registry";

const config = loadConfig();
if (cluster.isPrimary && config.webProcesses > 1) supervise(config);
else serve(config);

/** One web server process: the app on the port (shared through the cluster's primary when there is one). */
function serve(config: Config) {
  const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
  const database = connect(config.databaseUrl);
  const mailer = createMailer(config.smtp);
  const jobs = createJobSender(config.databaseUrl);
  const app = createApp({ ...database, config: { ...config, staticDir: config.staticDir ?? path.join(root, "dist") }, mailer, kinds: RUN_KINDS, jobs });

  const server = app.listen(config.port, config.host, () => {
    if (cluster.isPrimary) console.log(`Stagewright web server on http://${config.host}:${config.port}`);
  });

  let stopping = false;
  async function stop() {
    if (stopping) return;
    stopping = true;
    // Stop accepting, let requests in flight finish (up to 5 s), then drop what is left, and only then close the pool.
    const closed = new Promise<void>((resolve) => server.close(() => resolve()));
    server.closeIdleConnections();
    await Promise.race([closed, new Promise((resolve) => setTimeout(resolve, 5_000))]);
    server.closeAllConnections();
    mailer.close();
    await jobs.stop().catch(() => undefined);
    await database.pool.end().catch(() => undefined);
    process.exit(0);
  }
  process.on("SIGTERM", stop);
  process.on("SIGINT", stop);
  // A process of a cluster whose primary has gone (even by kill -9) stops too, rather than serving on alone.
  if (cluster.isWorker) process.on("disconnect", stop);
}

/**
 * The cluster's primary: starts `webProcesses` web server processes sharing the
 * port, keeps the rate limiters' counts for all of them, replaces a process that
 * dies, and on SIGTERM / SIGINT stops them all (each finishes its requests) before exiting.
 */
function supervise(config: Config) {
  new ClusterMemoryStorePrimary().init();
  let stopping = false;
  let announced = false;
  const listened = new WeakSet<object>();
  const stopAll = (code: number) => {
    if (stopping) return;
    stopping = true;
    for (const w of Object.values(cluster.workers ?? {})) w?.process.kill("SIGTERM");
    const done = () => Object.keys(cluster.workers ?? {}).length === 0 && process.exit(code);
    cluster.on("exit", done);
    done();
    setTimeout(() => process.exit(code || 1), 10_000).unref();
  };
  cluster.on("listening", (worker) => {
    listened.add(worker);
    const all = Object.values(cluster.workers ?? {});
    if (!announced && all.length === config.webProcesses && all.every((w) => w && listened.has(w))) {
      announced = true;
      console.log(`Stagewright web server on http://${config.host}:${config.port} (${config.webProcesses} processes)`);
    }
  });
  cluster.on("exit", (worker, code, signal) => {
    if (stopping) return;
    if (!listened.has(worker)) {
      // It never started listening (a bad setting, the port taken…): starting another would fail the same way.
      console.error(`A web server process ended (${signal ?? code}) before it was listening; stopping.`);
      return stopAll(1);
    }
    console.warn(`A web server process (pid ${worker.process.pid}) ended (${signal ?? code}); starting another.`);
    cluster.fork();
  });
  process.on("SIGTERM", () => stopAll(0));
  process.on("SIGINT", () => stopAll(0));
  for (let i = 0; i < config.webProcesses; i++) cluster.fork();
}
