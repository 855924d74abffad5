import { and, asc, eq, inArray, isNull, lt, or } from "drizzle-orm";
import type { NotificationMode } from "../../shared/schemas/review";
import { hmac, safeEqual } from "../auth/secrets";
import type { Db, DbOrTx } from "../db/client";
import { notificationPreferences, notifications, users } from "../db/schema";
import { badRequest } from "../http/errors";
import { sendQuietly, type Mailer } from "../mail/mailer";

/** What sending needs: the mailer, the address links start with, and the secret that signs unsubscribe links. */
export interface NotifyDeps {
  mailer: Mailer;
  publicUrl: string;
  secret: string;
}

export const NOTIFICATION_KINDS = ["invitation", "review_requested", "review_decision", "mention", "reply"] as const;
export type NotificationKind = (typeof NOTIFICATION_KINDS)[number];

export interface NotificationInput {
  userId: string;
  kind: NotificationKind;
  subject: string;
  /** The message without its link (the link and the footer are added when it is sent). */
  text: string;
  /** An in-app path ("/life-cycles/…?tab=review&thread=…"). */
  link: string;
}

/** The daily digest goes out at 07:00 UTC. */
export const DIGEST_CRON = "0 7 * * *";
export const DIGEST_QUEUE = "notification-digest";
/** An immediate message that could not be sent is tried again by the next digest run after this long. */
const IMMEDIATE_RETRY_MS = 5 * 60_000;

export async function notificationMode(db: DbOrTx, userId: string): Promise<NotificationMode> {
  const [row] = await db.select({ mode: notificationPreferences.mode }).from(notificationPreferences).where(eq(notificationPreferences.userId, userId));
  return row?.mode ?? "immediate";
}

export async function setNotificationMode(db: DbOrTx, userId: string, mode: NotificationMode): Promise<{ mode: NotificationMode }> {
  await db
    .insert(notificationPreferences)
    .values({ userId, mode })
    .onConflictDoUpdate({ target: notificationPreferences.userId, set: { mode, updatedAt: new Date() } });
  return { mode };
}

/**
 * Writes notifications into the outbox in the caller's transaction (so a
 * rolled-back change notifies nobody). People who turned e-mail off get
 * nothing. Returns the ids to send right after the commit.
 */
export async function queueNotifications(tx: DbOrTx, items: NotificationInput[]): Promise<number[]> {
  const immediate: number[] = [];
  const seen = new Set<string>();
  for (const item of items) {
    // One message per person and change, the first (most specific) kind wins.
    if (seen.has(item.userId)) continue;
    seen.add(item.userId);
    const mode = await notificationMode(tx, item.userId);
    if (mode === "off") continue;
    const [row] = await tx.insert(notifications).values({ ...item, mode }).returning({ id: notifications.id });
    if (mode === "immediate") immediate.push(row!.id);
  }
  return immediate;
}

/** `userId.signature`: lets the holder of an e-mail stop that person's e-mail without signing in. */
export function unsubscribeToken(secret: string, userId: string): string {
  return `${userId}.${hmac(secret, `unsubscribe:${userId}`)}`;
}

export function unsubscribeUrl(deps: Pick<NotifyDeps, "publicUrl" | "secret">, userId: string): string {
  return `${deps.publicUrl}/unsubscribe?token=${encodeURIComponent(unsubscribeToken(deps.secret, userId))}`;
}

/** Turns e-mail off for the person the signed token names. */
export async function unsubscribe(db: Db, secret: string, token: string): Promise<{ email: string; mode: NotificationMode }> {
  const [userId, signature] = token.split(".");
  const bad = () => badRequest("This unsubscribe link is not valid: it may be cut short. Open Settings to change your e-mail instead.", [{ path: "token", message: "Not a valid unsubscribe token." }]);
  if (!userId || !signature || !safeEqual(signature, hmac(secret, `unsubscribe:${userId}`))) throw bad();
  const [user] = await db.select({ email: users.email }).from(users).where(eq(users.id, userId));
  if (!user) throw bad();
  await setNotificationMode(db, userId, "off");
  return { email: user.email, mode: "off" };
}

function footer(deps: NotifyDeps, userId: string, mode: NotificationMode): string {
  return [
    "-- ",
    mode === "digest" ? "You get Stagewright's news once a day in a digest." : "You get Stagewright's news by e-mail as it happens.",
    `Change that in Settings: ${deps.publicUrl}/settings`,
    `Stop notification e-mails (no sign-in needed): ${unsubscribeUrl(deps, userId)}`,
  ].join("\n");
}

type Row = typeof notifications.$inferSelect & { email: string };

async function rowsWithEmail(db: DbOrTx, where: ReturnType<typeof and>): Promise<Row[]> {
  const rows = await db.select({ n: notifications, email: users.email }).from(notifications).innerJoin(users, eq(users.id, notifications.userId)).where(where).orderBy(asc(notifications.id));
  return rows.map((r) => ({ ...r.n, email: r.email }));
}

async function sendOne(db: DbOrTx, deps: NotifyDeps, row: Row): Promise<boolean> {
  const ok = await sendQuietly(deps.mailer, {
    to: row.email,
    subject: row.subject,
    text: `${row.text}\n\nOpen it in Stagewright: ${deps.publicUrl}${row.link}\n\n${footer(deps, row.userId, "immediate")}`,
  });
  if (ok) await db.update(notifications).set({ sentAt: new Date() }).where(eq(notifications.id, row.id));
  return ok;
}

/** Sends the immediate notifications with these ids (after their transaction committed). Never throws. */
export async function deliverNow(db: Db, deps: NotifyDeps, ids: number[]): Promise<void> {
  if (ids.length === 0) return;
  try {
    const rows = await rowsWithEmail(db, and(inArray(notifications.id, ids), isNull(notifications.sentAt)));
    for (const row of rows) await sendOne(db, deps, row);
  } catch (err) {
    console.warn(`Could not send notifications: ${(err as Error).message}`);
  }
}

/**
 * The daily digest: one e-mail per person with every notification waiting
 * for them, each with its link; also retries immediate ones that failed.
 */
export async function sendDigests(db: Db, deps: NotifyDeps, now = new Date()): Promise<{ digests: number; items: number; retried: number }> {
  const pending = await rowsWithEmail(db, and(isNull(notifications.sentAt), or(eq(notifications.mode, "digest"), and(eq(notifications.mode, "immediate"), lt(notifications.createdAt, new Date(now.getTime() - IMMEDIATE_RETRY_MS))))));
  let retried = 0;
  const byUser = new Map<string, Row[]>();
  for (const row of pending) {
    if (row.mode === "immediate") {
      if (await sendOne(db, deps, row)) retried++;
      continue;
    }
    byUser.set(row.userId, [...(byUser.get(row.userId) ?? []), row]);
  }
  let digests = 0;
  let items = 0;
  for (const [userId, rows] of byUser) {
    // Someone who switched to "off" since gets nothing; the rows stay unsent.
    if ((await notificationMode(db, userId)) === "off") continue;
    const text = [
      `Your Stagewright digest: ${rows.length} ${rows.length === 1 ? "thing" : "things"} since the last one.`,
      "",
      ...rows.flatMap((r, i) => [`${i + 1}. ${r.subject}`, ...r.text.split("\n").map((l) => (l ? `   ${l}` : "")), `   Open it: ${deps.publicUrl}${r.link}`, ""]),
      footer(deps, userId, "digest"),
    ].join("\n");
    const ok = await sendQuietly(deps.mailer, { to: rows[0]!.email, subject: `Stagewright daily digest: ${rows.length} ${rows.length === 1 ? "update" : "updates"}`, text });
    if (!ok) continue;
    await db.update(notifications).set({ sentAt: now }).where(inArray(notifications.id, rows.map((r) => r.id)));
    digests++;
    items += rows.length;
  }
  return { digests, items, retried };
}

/** Runs a change and writes its notifications in one transaction; sends the immediate e-mails after the commit. */
export async function withNotifications<T>(db: Db, deps: NotifyDeps, work: (tx: DbOrTx) => Promise<{ result: T; notices: NotificationInput[] }>): Promise<T> {
  const { result, ids } = await db.transaction(async (tx) => {
    const { result, notices } = await work(tx);
    return { result, ids: await queueNotifications(tx, notices) };
  });
  await deliverNow(db, deps, ids);
  return result;
}
