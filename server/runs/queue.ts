import PgBoss from "pg-boss";

export const CHUNK_QUEUE = "run-chunk";

export interface ChunkJob {
  runId: string;
  chunkIndex: number;
}

/**
 * Chunks take about a second. A job whose worker died is expired after
 * CHUNK_EXPIRE_SECONDS and retried by another worker; a job that throws is
 * retried CHUNK_RETRY_LIMIT times, then the run fails. pg-boss's own defaults
 * (15 minutes) would leave a run stalled for that long after a crash.
 */
export const CHUNK_EXPIRE_SECONDS = 20;
export const CHUNK_RETRY_LIMIT = 3;
export const MAINTENANCE_SECONDS = 5;

/** `schedule`: this process runs pg-boss's cron clock (workers do; the web server only sends). */
export function createBoss(databaseUrl: string, options: { supervise: boolean; schedule?: boolean }): PgBoss {
  const boss = new PgBoss({
    connectionString: databaseUrl,
    max: 4,
    supervise: options.supervise,
    maintenanceIntervalSeconds: MAINTENANCE_SECONDS,
    schedule: options.schedule ?? false,
  });
  boss.on("error", (err) => console.warn(`Job queue: ${err.message}`));
  return boss;
}

export async function ensureQueue(boss: PgBoss): Promise<void> {
  await boss.createQueue(CHUNK_QUEUE, {
    name: CHUNK_QUEUE,
    expireInSeconds: CHUNK_EXPIRE_SECONDS,
    retryLimit: CHUNK_RETRY_LIMIT,
    retryDelay: 1,
    retryBackoff: false,
  });
}

/** The web server's side of the queue: it only sends. Started on first use. */
export interface JobSender {
  sendChunks(jobs: ChunkJob[]): Promise<void>;
  stop(): Promise<void>;
}

export function createJobSender(databaseUrl: string): JobSender {
  let started: Promise<PgBoss> | undefined;
  const boss = () =>
    (started ??= (async () => {
      const b = createBoss(databaseUrl, { supervise: false });
      await b.start();
      await ensureQueue(b);
      return b;
    })().catch((err: unknown) => {
      // Not cached: the next Run tries again (e.g. once the database is back).
      started = undefined;
      throw err;
    }));
  return {
    async sendChunks(jobs) {
      const b = await boss();
      await b.insert(jobs.map((data) => ({ name: CHUNK_QUEUE, data, expireInSeconds: CHUNK_EXPIRE_SECONDS, retryLimit: CHUNK_RETRY_LIMIT, retryDelay: 1 })));
    },
    async stop() {
      if (started) await (await started).stop({ graceful: false, wait: true });
    },
  };
}
