import { drizzle, type NodePgDatabase } from "drizzle-orm/node-postgres";
import pg from "pg";
import * as schema from "./schema";

export type Db = NodePgDatabase<typeof schema>;
/** A transaction handle: services take `Db | Tx` so callers can compose them in one transaction. */
export type Tx = Parameters<Parameters<Db["transaction"]>[0]>[0];
export type DbOrTx = Db | Tx;

export interface Database {
  db: Db;
  pool: pg.Pool;
}

export function connect(databaseUrl: string, options: { max?: number } = {}): Database {
  const pool = new pg.Pool({ connectionString: databaseUrl, max: options.max ?? 10 });
  // An idle client losing its connection (e.g. PostgreSQL restarting) must not crash the process.
  pool.on("error", (err) => console.warn(`PostgreSQL pool: ${err.message}`));
  return { db: drizzle(pool, { schema }), pool };
}

/** The database `npm start` runs, for commands started beside it (worker, token) without DATABASE_URL. */
export function databaseUrlFromEnv(env: NodeJS.ProcessEnv = process.env): string {
  return env.DATABASE_URL ?? `postgres://postgres@127.0.0.1:${env.STAGEWRIGHT_PG_PORT ?? 54329}/stagewright`;
}
