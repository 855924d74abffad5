import { and, desc, eq, isNull, sql } from "drizzle-orm";
import type { ApiToken, ApiTokenScope, NewApiToken } from "../../shared/schemas/auth";
import type { SessionUser } from "../auth/types";
import { newSecret, sha256 } from "../auth/secrets";
import type { Db } from "../db/client";
import { apiTokens, users } from "../db/schema";
import { notFound } from "../http/errors";

/** Prefix so a leaked token is recognisable in logs and secret scanners. */
export const TOKEN_PREFIX = "sw_";

const toApiToken = (r: typeof apiTokens.$inferSelect): ApiToken => ({
  id: r.id,
  name: r.name,
  scope: r.scope === "read" ? "read" : "read-write",
  createdAt: r.createdAt.toISOString(),
  lastUsedAt: r.lastUsedAt ? r.lastUsedAt.toISOString() : null,
  expiresAt: r.expiresAt ? r.expiresAt.toISOString() : null,
});

export interface TokenOptions {
  scope?: ApiTokenScope;
  /** null or absent: never expires. */
  expiresInDays?: number | null;
}

export async function listApiTokens(db: Db, userId: string): Promise<ApiToken[]> {
  const rows = await db.select().from(apiTokens).where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt))).orderBy(desc(apiTokens.createdAt));
  return rows.map(toApiToken);
}

/** Mints a token: 32 random bytes shown once; only its SHA-256 is stored. Without options it may read and write and never expires. */
export async function createApiToken(db: Db, userId: string, name: string, options: TokenOptions = {}): Promise<NewApiToken> {
  const token = TOKEN_PREFIX + newSecret();
  const expiresAt = options.expiresInDays ? new Date(Date.now() + options.expiresInDays * 86_400_000) : null;
  const [row] = await db
    .insert(apiTokens)
    .values({ userId, name, tokenHash: sha256(token), scope: options.scope ?? "read-write", expiresAt })
    .returning();
  return { ...toApiToken(row!), token };
}

export async function revokeApiToken(db: Db, userId: string, tokenId: string): Promise<void> {
  const rows = await db
    .update(apiTokens)
    .set({ revokedAt: new Date() })
    .where(and(eq(apiTokens.id, tokenId), eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt)))
    .returning({ id: apiTokens.id });
  if (rows.length === 0) throw notFound("No such token.");
}

export type TokenCheck =
  | { ok: true; user: SessionUser; scope: ApiTokenScope }
  | { ok: false; reason: "unknown" | "revoked" | "expired"; message: string };

/**
 * The lookup behind every Bearer request, prepared once per database handle:
 * scripts call in tight loops, and building the SQL each time cost more than running it.
 */
const buildLookup = (db: Db) =>
  db
    .select({
      tokenId: apiTokens.id,
      id: users.id,
      name: users.name,
      email: users.email,
      lastUsedAt: apiTokens.lastUsedAt,
      revokedAt: apiTokens.revokedAt,
      expiresAt: apiTokens.expiresAt,
      scope: apiTokens.scope,
    })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(eq(apiTokens.tokenHash, sql.placeholder("hash")))
    .prepare("api_token_check");
const lookups = new WeakMap<Db, ReturnType<typeof buildLookup>>();
function tokenLookup(db: Db) {
  let lookup = lookups.get(db);
  if (!lookup) lookups.set(db, (lookup = buildLookup(db)));
  return lookup;
}

/** Who a Bearer token speaks for and what it may do; unknown, revoked and expired tokens are refused with a reason. */
export async function checkApiToken(db: Db, token: string): Promise<TokenCheck> {
  const [row] = await tokenLookup(db).execute({ hash: sha256(token) });
  if (!row) return { ok: false, reason: "unknown", message: "The API token is not valid: it may be mistyped. Mint a new one in Settings." };
  if (row.revokedAt) return { ok: false, reason: "revoked", message: "The API token was revoked. Mint a new one in Settings." };
  if (row.expiresAt && row.expiresAt.getTime() <= Date.now()) {
    return { ok: false, reason: "expired", message: `The API token expired on ${row.expiresAt.toISOString().slice(0, 10)}. Mint a new one in Settings.` };
  }
  // Record use at most once a minute: a busy script should not write on every request.
  if (!row.lastUsedAt || Date.now() - row.lastUsedAt.getTime() > 60_000) {
    await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, row.tokenId));
  }
  return { ok: true, user: { id: row.id, name: row.name, email: row.email }, scope: row.scope === "read" ? "read" : "read-write" };
}
