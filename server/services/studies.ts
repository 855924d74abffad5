import { and, count, desc, eq, gte, like, lt, sql } from "drizzle-orm";
import type { ActivityQuery } from "../../shared/schemas/review";
import type { AuditEvent, Member, MemberUpdate, Role, Study, StudyCreate, StudyUpdate } from "../../shared/schemas/studies";
import { StudyCreateSchema } from "../../shared/schemas/studies";
import type { Db, DbOrTx } from "../db/client";
import { auditEvents, memberships, studies, users } from "../db/schema";
import { HttpError, notFound } from "../http/errors";
import { recordEvent } from "./audit";

const iso = (d: Date | null) => (d ? d.toISOString() : null);

const studyColumns = {
  id: studies.id,
  name: studies.name,
  description: studies.description,
  archivedAt: studies.archivedAt,
  createdAt: studies.createdAt,
  role: memberships.role,
  memberCount: sql<number>`(select count(*)::int from ${memberships} m where m.study_id = ${studies.id})`,
};

type StudyRow = { id: string; name: string; description: string; archivedAt: Date | null; createdAt: Date; role: Role; memberCount: number };
const toStudy = (r: StudyRow): Study => ({ ...r, archivedAt: iso(r.archivedAt), createdAt: r.createdAt.toISOString() });

/** The caller's role in a Study, or null when not a member (or no such Study). */
export async function membershipRole(db: DbOrTx, studyId: string, userId: string): Promise<Role | null> {
  const [m] = await db
    .select({ role: memberships.role })
    .from(memberships)
    .where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
  return m?.role ?? null;
}

export async function listStudies(db: Db, userId: string): Promise<Study[]> {
  const rows = await db
    .select(studyColumns)
    .from(memberships)
    .innerJoin(studies, eq(studies.id, memberships.studyId))
    .where(eq(memberships.userId, userId))
    .orderBy(studies.name);
  return rows.map(toStudy);
}

export async function getStudy(db: DbOrTx, studyId: string, userId: string): Promise<Study> {
  const [row] = await db
    .select(studyColumns)
    .from(memberships)
    .innerJoin(studies, eq(studies.id, memberships.studyId))
    .where(and(eq(memberships.userId, userId), eq(studies.id, studyId)));
  if (!row) throw notFound("No such Study.");
  return toStudy(row);
}

export async function createStudy(db: Db, userId: string, input: StudyCreate): Promise<Study> {
  const data = StudyCreateSchema.parse(input);
  return db.transaction(async (tx) => {
    const [s] = await tx.insert(studies).values({ name: data.name, description: data.description, createdBy: userId }).returning();
    await tx.insert(memberships).values({ studyId: s!.id, userId, role: "owner" });
    await recordEvent(tx, { studyId: s!.id, actorId: userId, action: "study.created", summary: `created the Study “${data.name}”` });
    return getStudy(tx, s!.id, userId);
  });
}

export async function updateStudy(db: Db, studyId: string, userId: string, input: StudyUpdate): Promise<Study> {
  return db.transaction(async (tx) => {
    const [before] = await tx.select().from(studies).where(eq(studies.id, studyId)).for("update");
    if (!before) throw notFound("No such Study.");
    const changes: Partial<typeof studies.$inferInsert> = {};
    const said: string[] = [];
    if (input.name !== undefined && input.name !== before.name) {
      changes.name = input.name;
      said.push(`renamed the Study from “${before.name}” to “${input.name}”`);
    }
    if (input.description !== undefined && input.description !== before.description) {
      changes.description = input.description;
      said.push("changed the Study's description");
    }
    if (input.archived !== undefined && input.archived !== (before.archivedAt !== null)) {
      changes.archivedAt = input.archived ? new Date() : null;
      said.push(input.archived ? "archived the Study" : "restored the Study from the archive");
    }
    if (said.length > 0) {
      await tx.update(studies).set(changes).where(eq(studies.id, studyId));
      await recordEvent(tx, { studyId, actorId: userId, action: "study.updated", summary: said.join("; "), details: { before: { name: before.name, archived: before.archivedAt !== null }, changes: input } });
    }
    return getStudy(tx, studyId, userId);
  });
}

export async function listMembers(db: Db, studyId: string): Promise<Member[]> {
  const rows = await db
    .select({ userId: users.id, name: users.name, email: users.email, role: memberships.role, joinedAt: memberships.createdAt })
    .from(memberships)
    .innerJoin(users, eq(users.id, memberships.userId))
    .where(eq(memberships.studyId, studyId))
    .orderBy(users.name);
  return rows.map((r) => ({ ...r, joinedAt: r.joinedAt.toISOString() }));
}

async function ownerCount(tx: DbOrTx, studyId: string): Promise<number> {
  const [r] = await tx.select({ n: count() }).from(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.role, "owner")));
  return r?.n ?? 0;
}

/** Locks the Study's membership rows so two owners demoting each other cannot leave it ownerless. */
async function lockMembers(tx: DbOrTx, studyId: string) {
  return tx.select().from(memberships).where(eq(memberships.studyId, studyId)).for("update");
}

export async function changeMemberRole(db: Db, studyId: string, actorId: string, userId: string, input: MemberUpdate): Promise<Member> {
  return db.transaction(async (tx) => {
    const rows = await lockMembers(tx, studyId);
    const target = rows.find((r) => r.userId === userId);
    if (!target) throw notFound("That person is not a member of this Study.");
    if (target.role === input.role) return (await listMembers(tx as Db, studyId)).find((m) => m.userId === userId)!;
    if (target.role === "owner" && (await ownerCount(tx, studyId)) <= 1) {
      throw new HttpError(409, "A Study needs at least one owner: make someone else an owner first.", "last_owner", [{ path: "role", message: "The last owner cannot be demoted." }]);
    }
    await tx.update(memberships).set({ role: input.role }).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
    const [who] = await tx.select({ name: users.name }).from(users).where(eq(users.id, userId));
    await recordEvent(tx, { studyId, actorId, action: "member.role_changed", summary: `changed ${who?.name ?? "a member"}'s role from ${target.role} to ${input.role}`, details: { userId, from: target.role, to: input.role } });
    return (await listMembers(tx as Db, studyId)).find((m) => m.userId === userId)!;
  });
}

export async function removeMember(db: Db, studyId: string, actorId: string, actorRole: Role, userId: string): Promise<void> {
  if (actorId !== userId && actorRole !== "owner") throw new HttpError(403, "Only owners can remove other members.");
  await db.transaction(async (tx) => {
    const rows = await lockMembers(tx, studyId);
    const target = rows.find((r) => r.userId === userId);
    if (!target) throw notFound("That person is not a member of this Study.");
    if (target.role === "owner" && (await ownerCount(tx, studyId)) <= 1) {
      throw new HttpError(409, "A Study needs at least one owner: make someone else an owner before the last owner leaves.", "last_owner");
    }
    await tx.delete(memberships).where(and(eq(memberships.studyId, studyId), eq(memberships.userId, userId)));
    const [who] = await tx.select({ name: users.name }).from(users).where(eq(users.id, userId));
    await recordEvent(tx, {
      studyId,
      actorId,
      action: actorId === userId ? "member.left" : "member.removed",
      summary: actorId === userId ? "left the Study" : `removed ${who?.name ?? "a member"} from the Study`,
      details: { userId, role: target.role },
    });
  });
}

/**
 * A Study's activity, newest first, filtered by kind (action prefix), person,
 * life cycle and dates; page with `before` (the last id seen).
 */
export async function listActivity(db: Db, studyId: string, query: Partial<ActivityQuery> = {}): Promise<AuditEvent[]> {
  const where = [eq(auditEvents.studyId, studyId)];
  if (query.kind) where.push(like(auditEvents.action, `${query.kind}.%`));
  if (query.actorId) where.push(eq(auditEvents.actorId, query.actorId));
  if (query.lifeCycleId) where.push(sql`${auditEvents.details}->>'lifeCycleId' = ${query.lifeCycleId}`);
  if (query.from) where.push(gte(auditEvents.createdAt, new Date(`${query.from}T00:00:00Z`)));
  if (query.to) where.push(lt(auditEvents.createdAt, new Date(new Date(`${query.to}T00:00:00Z`).getTime() + 86_400_000)));
  if (query.before) where.push(lt(auditEvents.id, query.before));
  const rows = await db
    .select({ id: auditEvents.id, action: auditEvents.action, summary: auditEvents.summary, createdAt: auditEvents.createdAt, actorId: auditEvents.actorId, actorName: users.name, details: auditEvents.details })
    .from(auditEvents)
    .leftJoin(users, eq(users.id, auditEvents.actorId))
    .where(and(...where))
    .orderBy(desc(auditEvents.id))
    .limit(query.limit ?? 200);
  return rows.map((r) => {
    const lifeCycleId = (r.details as { lifeCycleId?: unknown } | null)?.lifeCycleId;
    return {
      id: String(r.id),
      action: r.action,
      summary: r.summary,
      actorId: r.actorId,
      actorName: r.actorName ?? null,
      lifeCycleId: typeof lifeCycleId === "string" ? lifeCycleId : null,
      createdAt: r.createdAt.toISOString(),
    };
  });
}
