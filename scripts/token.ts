// `npm run token -- <email> [name]`: mints a personal API token for scripts and administrators.
// Needs the database that `npm start` runs (or DATABASE_URL).
import { connect, databaseUrlFromEnv } from "../server/db/client";
import { createApiToken } from "../server/services/api-tokens";
import { findUserByEmail } from "../server/services/users";

const [email, name = "command line"] = process.argv.slice(2);
if (!email) {
  console.error("Usage: npm run token -- <email> [token name]");
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
    const token = await createApiToken(db, user.id, name);
    console.log(token.token);
    console.error(`Token “${name}” for ${user.email}. It is shown once: keep it secret; revoke it in Settings.`);
  }
} catch (err) {
  console.error(`Could not reach the database at ${url.replace(/\/\/[^@]*@/, "//")}: ${(err as Error).message}. Is \`npm start\` running?`);
  process.exitCode = 1;
} finally {
  await pool.end();
}
