import { and, eq, gt, isNull } from "drizzle-orm";
import { newSecret, sha256 } from "../auth/secrets";
import type { Db } from "../db/client";
import { passwordResets, users } from "../db/schema";
import { badRequest } from "../http/errors";
import type { Mailer } from "../mail/mailer";
import { sendQuietly } from "../mail/mailer";
import { setPassword } from "./users";

export const RESET_MINUTES = 30;

/** Sends a single-use link when the address is registered; says nothing either way. */
export async function requestPasswordReset(db: Db, deps: { mailer: Mailer; publicUrl: string }, email: string): Promise<void> {
  const [user] = await db.select().from(users).where(eq(users.email, email));
  if (!user) return;
  const token = newSecret();
  await db.insert(passwordResets).values({ userId: user.id, tokenHash: sha256(token), expiresAt: new Date(Date.now() + RESET_MINUTES * 60_000) });
  await sendQuietly(deps.mailer, {
    to: user.email,
    subject: "Reset your Stagewright password",
    text: [
      `Hello ${user.name},`,
      "",
      `Someone (we hope you) asked to reset the password of your Stagewright account. This link works once, for ${RESET_MINUTES} minutes:`,
      `${deps.publicUrl}/reset-password?token=${token}`,
      "",
      "If you did not ask for this, ignore this message: your password stays as it is.",
    ].join("\n"),
  });
}

export async function confirmPasswordReset(db: Db, token: string, password: string): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx
      .update(passwordResets)
      .set({ usedAt: new Date() })
      .where(and(eq(passwordResets.tokenHash, sha256(token)), isNull(passwordResets.usedAt), gt(passwordResets.expiresAt, new Date())))
      .returning();
    if (!row) throw badRequest("This reset link is not valid any more: it may have expired or been used. Ask for a new one.", [{ path: "token", message: "Expired or already used." }]);
    await setPassword(tx, row.userId, password);
    // Any other outstanding links for this account stop working too.
    await tx.update(passwordResets).set({ usedAt: new Date() }).where(and(eq(passwordResets.userId, row.userId), isNull(passwordResets.usedAt)));
  });
}
