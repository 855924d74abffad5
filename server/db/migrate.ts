import { migrate } from "drizzle-orm/node-postgres/migrator";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createBoss, ensureQueue } from "../runs/queue";
import { connect } from "./client";

const migrationsFolder = path.resolve(path.dirname(fileURLToPath(import.meta.url)), "../../drizzle");

/**
 * Applies the generated SQL migrations in drizzle/, then installs (or upgrades)
 * the job queue's own schema and the Run chunk queue. Doing the queue here, before
 * any worker or web server starts, means those never race to create it on a fresh
 * database (a worker that lost that race died at start, and its Runs waited forever).
 */
export async function runMigrations(databaseUrl: string): Promise<void> {
  const { db, pool } = connect(databaseUrl, { max: 1 });
  try {
    await migrate(db, { migrationsFolder });
  } finally {
    await pool.end();
  }
  const boss = createBoss(databaseUrl, { supervise: false });
  await boss.start();
  try {
    await ensureQueue(boss);
  } finally {
    await boss.stop({ graceful: false, wait: true });
  }
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const url = process.env.DATABASE_URL;
  if (!url) throw new Error("DATABASE_URL is not set");
  await runMigrations(url);
}
