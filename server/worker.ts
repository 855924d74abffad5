// A worker: takes chunk jobs from the queue on the same PostgreSQL and works them.
// `npm start` runs one; `npm run worker` starts more (on this or other machines).
import type PgBoss from "pg-boss";
import { loadConfig } from "./config";
import { connect, databaseUrlFromEnv } from "./db/client";
import { scheduleDigest, workDigest } from "./mail/digest-job";
import { createMailer } from "./mail/mailer";
import { failRun, processChunk } from "./runs/process";
import { CHUNK_QUEUE, createBoss, ensureQueue, type ChunkJob } from "./runs/queue";
import { RUN_KINDS } from "./runs/registry";

const url = databaseUrlFromEnv();
const { db, pool } = connect(url, { max: 4 });
const config = loadConfig({ ...process.env, DATABASE_URL: url });
const mailer = createMailer(config.smtp);
const boss = createBoss(url, { supervise: true, schedule: true });
await boss.start();
await ensureQueue(boss);
// The daily notification digest is sent by whichever worker takes the day's job.
await scheduleDigest(boss);
await workDigest(boss, db, { mailer, publicUrl: config.publicUrl, secret: config.sessionSecret });

await boss.work<ChunkJob>(CHUNK_QUEUE, { batchSize: 1, pollingIntervalSeconds: 0.5, includeMetadata: true }, async ([job]: PgBoss.JobWithMetadata<ChunkJob>[]) => {
  if (!job) return;
  try {
    await processChunk(db, RUN_KINDS, job.data);
  } catch (err) {
    // Out of retries: the run fails with the reason; otherwise pg-boss tries the chunk again.
    if (job.retryCount >= job.retryLimit) await failRun(db, job.data.runId, err);
    else console.warn(`Chunk ${job.data.chunkIndex} of run ${job.data.runId} failed (attempt ${job.retryCount + 1}): ${(err as Error).message}`);
    throw err;
  }
});
console.log(`Stagewright worker ${process.pid} is waiting for runs.`);

let stopping = false;
async function stop() {
  if (stopping) return;
  stopping = true;
  await boss.stop({ graceful: true, wait: true, timeout: 10_000 }).catch(() => undefined);
  mailer.close();
  await pool.end().catch(() => undefined);
  process.exit(0);
}
process.on("SIGTERM", stop);
process.on("SIGINT", stop);
