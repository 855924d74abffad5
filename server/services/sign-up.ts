import { and, eq, gt, isNull } from "drizzle-orm";
import type { SignUp } from "../../shared/schemas/auth";
import type { SessionUser } from "../auth/types";
import { hashPassword, newSecret, sha256 } from "../auth/secrets";
import type { Db } from "../db/client";
import { signUpRequests, users } from "../db/schema";
import { badRequest } from "../http/errors";
import type { Mailer } from "../mail/mailer";
import { sendQuietly } from "../mail/mailer";
import { acceptInvitation, acceptInvitationById, openInvitationByToken } from "./invitations";
import { insertUser } from "./users";

export const SIGN_UP_HOURS = 24;

export type SignUpDone = { user: SessionUser; joinedStudyId?: string };

/** What sign-up answers whenever it e-mails a link, whether or not the address already has an account. */
export const signUpPendingMessage = (email: string) =>
  `Check your inbox: we sent a message to ${email}. Open its link to finish creating your account (it works once, for ${SIGN_UP_HOURS} hours).`;

/**
 * Sign-up without user enumeration. The answer is the same for a new and a
 * registered address: a new one gets a link that creates the account, a
 * registered one a note telling its owner to sign in or reset the password.
 * The one exception proves mailbox ownership already: an invitation link sent
 * to the very address signed up with creates the account at once (returned).
 */
export async function requestSignUp(db: Db, deps: { mailer: Mailer; publicUrl: string }, input: SignUp): Promise<SignUpDone | null> {
  // Hash first on every path, so both answers take about the same time.
  const passwordHash = await hashPassword(input.password);
  const invitation = input.invitationToken ? await openInvitationByToken(db, input.invitationToken) : null;
  if (invitation && input.invitationToken && invitation.email === input.email) {
    const token = input.invitationToken;
    return db.transaction(async (tx) => {
      const user = await insertUser(tx, { name: input.name, email: input.email, passwordHash });
      const joined = await acceptInvitation(tx, token, user);
      return { user, joinedStudyId: joined.studyId };
    });
  }
  const [existing] = await db.select({ name: users.name }).from(users).where(eq(users.email, input.email));
  if (existing) {
    await sendQuietly(deps.mailer, {
      to: input.email,
      subject: "You already have a Stagewright account",
      text: [
        `Hello ${existing.name},`,
        "",
        "Someone (we hope you) tried to create a new Stagewright account with this e-mail address, but it already has one. Nothing was changed.",
        "",
        `Sign in: ${deps.publicUrl}/sign-in`,
        `Forgot your password? ${deps.publicUrl}/forgot-password`,
        ...(invitation ? ["", "To join the Study you were invited to, sign in and open the invitation link again."] : []),
        "",
        "If this was not you, you can ignore this message.",
      ].join("\n"),
    });
    return null;
  }
  const token = newSecret();
  await db.insert(signUpRequests).values({
    email: input.email,
    name: input.name,
    passwordHash,
    tokenHash: sha256(token),
    invitationId: invitation?.id ?? null,
    expiresAt: new Date(Date.now() + SIGN_UP_HOURS * 3_600_000),
  });
  await sendQuietly(deps.mailer, {
    to: input.email,
    subject: "Finish creating your Stagewright account",
    text: [
      `Hello ${input.name},`,
      "",
      `Open this link to finish creating your Stagewright account (it works once, for ${SIGN_UP_HOURS} hours):`,
      `${deps.publicUrl}/sign-up/confirm?token=${token}`,
      "",
      "If you did not ask for an account, ignore this message: nothing is created without the link.",
    ].join("\n"),
  });
  return null;
}

/** Opens an e-mailed sign-up link: creates the account (and joins the invited Study, if that invitation is still open). */
export async function confirmSignUp(db: Db, token: string): Promise<SignUpDone> {
  return db.transaction(async (tx) => {
    const [row] = await tx
      .update(signUpRequests)
      .set({ usedAt: new Date() })
      .where(and(eq(signUpRequests.tokenHash, sha256(token)), isNull(signUpRequests.usedAt), gt(signUpRequests.expiresAt, new Date())))
      .returning();
    if (!row) {
      throw badRequest("This sign-up link is not valid any more: it may have expired or been used. Sign up again, or sign in if your account exists.", [
        { path: "token", message: "Expired or already used." },
      ]);
    }
    const user = await insertUser(tx, { name: row.name, email: row.email, passwordHash: row.passwordHash });
    // Other links sent to the same address stop working.
    await tx.update(signUpRequests).set({ usedAt: new Date() }).where(and(eq(signUpRequests.email, row.email), isNull(signUpRequests.usedAt)));
    const joined = row.invitationId ? await acceptInvitationById(tx, row.invitationId, user) : null;
    return { user, ...(joined ? { joinedStudyId: joined.studyId } : {}) };
  });
}
