import { and, desc, eq, isNull } from "drizzle-orm";
import type { ApiToken, NewApiToken } from "../../shared/schemas/auth";
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
  createdAt: r.createdAt.toISOString(),
  lastUsedAt: r.lastUsedAt ? r.lastUsedAt.toISOString() : null,
});

export async function listApiTokens(db: Db, userId: string): Promise<ApiToken[]> {
  const rows = await db.select().from(apiTokens).where(and(eq(apiTokens.userId, userId), isNull(apiTokens.revokedAt))).orderBy(desc(apiTokens.createdAt));
  return rows.map(toApiToken);
}

/** Mints a token: 32 random bytes shown once; only its SHA-256 is stored. */
export async function createApiToken(db: Db, userId: string, name: string): Promise<NewApiToken> {
  const token = TOKEN_PREFIX + newSecret();
  const [row] = await db.insert(apiTokens).values({ userId, name, tokenHash: sha256(token) }).returning();
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

/** The user a Bearer token belongs to, or null when unknown or revoked. */
export async function userForApiToken(db: Db, token: string): Promise<SessionUser | null> {
  const [row] = await db
    .select({ tokenId: apiTokens.id, id: users.id, name: users.name, email: users.email, lastUsedAt: apiTokens.lastUsedAt })
    .from(apiTokens)
    .innerJoin(users, eq(users.id, apiTokens.userId))
    .where(and(eq(apiTokens.tokenHash, sha256(token)), isNull(apiTokens.revokedAt)));
  if (!row) return null;
  // Record use at most once a minute: a busy script should not write on every request.
  if (!row.lastUsedAt || Date.now() - row.lastUsedAt.getTime() > 60_000) {
    await db.update(apiTokens).set({ lastUsedAt: new Date() }).where(eq(apiTokens.id, row.tokenId));
  }
  return { id: row.id, name: row.name, email: row.email };
}
