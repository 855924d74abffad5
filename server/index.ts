import path from "node:path";
import { fileURLToPath } from "node:url";
import { createApp } from "./app";
import { loadConfig } from "./config";
import { connect } from "./db/client";
import { createMailer } from "./mail/mailer";
import { createJobSender } from "./runs/queue";
import { RUN_KINDS } from "./runs/registry";

const config = loadConfig();
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "..");
const database = connect(config.databaseUrl);
const mailer = createMailer(config.smtp);
const jobs = createJobSender(config.databaseUrl);
const app = createApp({ ...database, config: { ...config, staticDir: config.staticDir ?? path.join(root, "dist") }, mailer, kinds: RUN_KINDS, jobs });

const server = app.listen(config.port, config.host, () => {
  console.log(`Stagewright web server on http://${config.host}:${config.port}`);
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
