import { and, eq, gt, isNull } from "drizzle-orm";
import type { Invitation, InvitationCreate, InvitationPreview } from "../../shared/schemas/studies";
import { newSecret, sha256 } from "../auth/secrets";
import type { Db, DbOrTx } from "../db/client";
import { invitations, memberships, studies, users } from "../db/schema";
import { HttpError, notFound } from "../http/errors";
import type { Mailer } from "../mail/mailer";
import { sendQuietly } from "../mail/mailer";
import { recordEvent } from "./audit";
import { notificationMode, unsubscribeUrl } from "./notifications";

export const INVITATION_DAYS = 14;

const toInvitation = (r: { id: string; email: string; role: Invitation["role"]; invitedBy: string | null; createdAt: Date; expiresAt: Date }): Invitation => ({
  id: r.id,
  email: r.email,
  role: r.role,
  invitedBy: r.invitedBy ?? "",
  createdAt: r.createdAt.toISOString(),
  expiresAt: r.expiresAt.toISOString(),
});

const open = () => and(isNull(invitations.acceptedAt), isNull(invitations.revokedAt), gt(invitations.expiresAt, new Date()));

export async function listInvitations(db: Db, studyId: string): Promise<Invitation[]> {
  const rows = await db
    .select({ id: invitations.id, email: invitations.email, role: invitations.role, invitedBy: users.name, createdAt: invitations.createdAt, expiresAt: invitations.expiresAt })
    .from(invitations)
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(and(eq(invitations.studyId, studyId), open()))
    .orderBy(invitations.createdAt);
  return rows.map(toInvitation);
}

export async function createInvitation(
  db: Db,
  deps: { mailer: Mailer; publicUrl: string; secret?: string },
  studyId: string,
  inviter: { id: string; name: string },
  input: InvitationCreate,
): Promise<Invitation> {
  const token = newSecret();
  const { invitation, studyName, recipient } = await db.transaction(async (tx) => {
    const [study] = await tx.select().from(studies).where(eq(studies.id, studyId));
    if (!study) throw notFound("No such Study.");
    const [already] = await tx
      .select({ id: users.id })
      .from(memberships)
      .innerJoin(users, eq(users.id, memberships.userId))
      .where(and(eq(memberships.studyId, studyId), eq(users.email, input.email)));
    if (already) throw new HttpError(409, `${input.email} is already a member of this Study.`, "conflict", [{ path: "email", message: "Already a member." }]);
    // A new invitation to the same address replaces the open one.
    await tx.update(invitations).set({ revokedAt: new Date() }).where(and(eq(invitations.studyId, studyId), eq(invitations.email, input.email), open()));
    const [row] = await tx
      .insert(invitations)
      .values({ studyId, email: input.email, role: input.role, tokenHash: sha256(token), invitedBy: inviter.id, expiresAt: new Date(Date.now() + INVITATION_DAYS * 86_400_000) })
      .returning();
    await recordEvent(tx, { studyId, actorId: inviter.id, action: "invitation.created", summary: `invited ${input.email} as ${input.role}`, details: { email: input.email, role: input.role } });
    // An invitation is not a notification: it is always sent at once, whatever the invitee's e-mail setting (the
    // link is a credential, so never in a digest). Someone with an account still getting notifications is told how to stop them.
    const [user] = await tx.select({ id: users.id }).from(users).where(eq(users.email, input.email));
    const mode = user ? await notificationMode(tx, user.id) : null;
    return { invitation: row!, studyName: study.name, recipient: user && mode !== "off" ? user.id : null };
  });
  await sendQuietly(deps.mailer, {
    to: input.email,
    subject: `${inviter.name} invited you to the Study “${studyName}” on Stagewright`,
    text: [
      `${inviter.name} invited you to join the Study “${studyName}” on Stagewright as ${input.role}.`,
      "",
      `Open this link to join (it works for ${INVITATION_DAYS} days, once):`,
      `${deps.publicUrl}/invitations/${token}`,
      "",
      "If you do not have an account yet, the link lets you create one with this e-mail address.",
      "If you did not expect this message, you can ignore it.",
      ...(recipient && deps.secret ? ["", "-- ", `Change how Stagewright e-mails you in Settings: ${deps.publicUrl}/settings`, `Stop notification e-mails (no sign-in needed): ${unsubscribeUrl({ publicUrl: deps.publicUrl, secret: deps.secret }, recipient)}`] : []),
    ].join("\n"),
  });
  return toInvitation({ ...invitation, invitedBy: inviter.name });
}

export async function revokeInvitation(db: Db, studyId: string, actorId: string, invitationId: string): Promise<void> {
  await db.transaction(async (tx) => {
    const [row] = await tx
      .update(invitations)
      .set({ revokedAt: new Date() })
      .where(and(eq(invitations.id, invitationId), eq(invitations.studyId, studyId), open()))
      .returning();
    if (!row) throw notFound("No open invitation with that id.");
    await recordEvent(tx, { studyId, actorId, action: "invitation.revoked", summary: `revoked the invitation of ${row.email}`, details: { email: row.email } });
  });
}

async function findOpenWhere(db: DbOrTx, where: ReturnType<typeof eq>) {
  const [row] = await db
    .select({ inv: invitations, studyName: studies.name, inviterName: users.name })
    .from(invitations)
    .innerJoin(studies, eq(studies.id, invitations.studyId))
    .leftJoin(users, eq(users.id, invitations.invitedBy))
    .where(and(where, open()));
  return row ?? null;
}

async function findOpen(db: DbOrTx, token: string) {
  const row = await findOpenWhere(db, eq(invitations.tokenHash, sha256(token)));
  if (!row) throw notFound("This invitation link is not valid: it may have expired, been used or been revoked. Ask the Study's owner for a new one.");
  return row;
}

/** The open invitation a link's token belongs to (id and address), or null. */
export async function openInvitationByToken(db: DbOrTx, token: string): Promise<{ id: string; email: string } | null> {
  const row = await findOpenWhere(db, eq(invitations.tokenHash, sha256(token)));
  return row ? { id: row.inv.id, email: row.inv.email } : null;
}

export async function previewInvitation(db: Db, token: string): Promise<InvitationPreview> {
  const row = await findOpen(db, token);
  const [existing] = await db.select({ id: users.id }).from(users).where(eq(users.email, row.inv.email));
  return { studyName: row.studyName, role: row.inv.role, email: row.inv.email, invitedBy: row.inviterName ?? "A Study owner", accountExists: !!existing };
}

/**
 * Joins the signed-in user to the invitation's Study. The link is the proof:
 * whoever holds it may accept with their own account (people often have two addresses).
 */
export async function acceptInvitation(tx: DbOrTx, token: string, user: { id: string; email: string }): Promise<{ studyId: string }> {
  return acceptOpen(tx, await findOpen(tx, token), user);
}

/** Accepts an invitation by id if it is still open (a sign-up finished from its e-mailed link); null when it is not. */
export async function acceptInvitationById(tx: DbOrTx, invitationId: string, user: { id: string; email: string }): Promise<{ studyId: string } | null> {
  const row = await findOpenWhere(tx, eq(invitations.id, invitationId));
  return row ? acceptOpen(tx, row, user) : null;
}

async function acceptOpen(tx: DbOrTx, row: NonNullable<Awaited<ReturnType<typeof findOpenWhere>>>, user: { id: string; email: string }): Promise<{ studyId: string }> {
  const claimed = await tx
    .update(invitations)
    .set({ acceptedAt: new Date() })
    .where(and(eq(invitations.id, row.inv.id), isNull(invitations.acceptedAt)))
    .returning({ id: invitations.id });
  if (claimed.length === 0) throw notFound("This invitation has just been used.");
  const inserted = await tx
    .insert(memberships)
    .values({ studyId: row.inv.studyId, userId: user.id, role: row.inv.role })
    .onConflictDoNothing()
    .returning();
  await recordEvent(tx, {
    studyId: row.inv.studyId,
    actorId: user.id,
    action: "invitation.accepted",
    summary: inserted.length > 0 ? `joined the Study as ${row.inv.role} (invited as ${row.inv.email})` : "opened an invitation but was already a member",
    details: { invitationId: row.inv.id, role: row.inv.role },
  });
  return { studyId: row.inv.studyId };
}
