// `npm run token -- <email> [name] [--read] [--days N]`: mints a personal API token for scripts and administrators.
// Without --read the token may read and write; without --days it never expires.
// Needs the database that `npm start` runs (or DATABASE_URL).
import { parseArgs } from "node:util";
import { connect, databaseUrlFromEnv } from "../server/db/client";
import { createApiToken } from "../server/services/api-tokens";
import { findUserByEmail } from "../server/services/users";

const { values, positionals } = parseArgs({ allowPositionals: true, options: { read: { type: "boolean" }, days: { type: "string" } } });
const [email, name = "command line"] = positionals;
const days = values.days === undefined ? null : Number(values.days);
if (!email || (days !== null && !(Number.isInteger(days) && days >= 1 && days <= 366))) {
  console.error("Usage: npm run token -- <email> [token name] [--read] [--days 1–366]");
  process.exit(2);
}
const url = databaseUrlFromEnv();
const { db, pool } = connect(url, { max: 1 });
try {
  const user = await findUserByEmail(db, email.trim().toLowerCase());
  if (!user) {
    console.error(`No account uses ${email}.`);
    process.exitCode = 1;
  } else {
    const token = await createApiToken(db, user.id, name, { scope: values.read ? "read" : "read-write", expiresInDays: days });
    console.log(token.token);
    const expiry = token.expiresAt ? `expires ${token.expiresAt.slice(0, 10)}` : "never expires";
    console.error(`Token “${name}” for ${user.email} (${token.scope}, ${expiry}). It is shown once: keep it secret; revoke it in Settings.`);
  }
} catch (err) {
  console.error(`Could not reach the database at ${url.replace(/\/\/[^@]*@/, "//")}: ${(err as Error).message}. Is \`npm start\` running?`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
