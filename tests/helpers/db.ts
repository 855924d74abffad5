import { randomBytes } from "node:crypto";
import pg from "pg";
import { connect, type Database } from "../../server/db/client";

function base(): string {
  const url = process.env.STAGEWRIGHT_TEST_PG;
  if (!url) {
    // Fail, never skip: these tests need the PostgreSQL that `npm test` starts.
    throw new Error("STAGEWRIGHT_TEST_PG is not set: run the tests with `npm test` (or `npm test -- <file>`), which starts PostgreSQL.");
  }
  return url;
}

/** A database of this test file's own, cloned from the migrated template. */
export async function createTestDatabase(): Promise<Database & { url: string; drop: () => Promise<void> }> {
  const name = `sw_test_${randomBytes(6).toString("hex")}`;
  const admin = new pg.Client({ connectionString: `${base()}/postgres` });
  await admin.connect();
  try {
    await admin.query(`CREATE DATABASE "${name}" TEMPLATE "${process.env.STAGEWRIGHT_TEST_TEMPLATE ?? "stagewright_template"}"`);
  } finally {
    await admin.end();
  }
  const url = `${base()}/${name}`;
  const database = connect(url);
  return {
    ...database,
    url,
    async drop() {
      await database.pool.end();
      const c = new pg.Client({ connectionString: `${base()}/postgres` });
      await c.connect();
      await c.query(`DROP DATABASE IF EXISTS "${name}" WITH (FORCE)`);
      await c.end();
    },
  };
}
