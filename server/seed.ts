import { and, eq } from "drizzle-orm";
import path from "node:path";
import { fileURLToPath } from "node:url";
import type { Role } from "../shared/schemas/studies";
import { hashPassword } from "./auth/secrets";
import { connect, type Db } from "./db/client";
import { memberships, studies, users } from "./db/schema";
import { recordEvent } from "./services/audit";

/** Invented people, species and places: the demo must never pass for real data. */
export const DEMO_PASSWORD = "stagewright-demo";
export const DEMO_USERS: { email: string; name: string; role: Role }[] = [
  { email: "olwen.marsh@example.org", name: "Olwen Marsh", role: "owner" },
  { email: "ellis.reed@example.org", name: "Ellis Reed", role: "editor" },
  { email: "rowan.vale@example.org", name: "Rowan Vale", role: "reviewer" },
];
export const DEMO_STUDY_NAME = "Brannock fen newt — Brannock Fen and Kessel Marsh";
const DEMO_STUDY_DESCRIPTION =
  "Demo data: an invented amphibian (the Brannock fen newt, Paludotriton brannockensis) at two invented wetland sites. " +
  "Fifteen years of pond counts and a few hundred marked individuals, used to show what Stagewright does. Nothing here describes a real population.";

/** Creates the demo accounts and Study once; running it again changes nothing. */
export async function seedDemo(db: Db): Promise<{ studyId: string; created: boolean }> {
  return db.transaction(async (tx) => {
    const ids: Record<string, string> = {};
    for (const u of DEMO_USERS) {
      const [existing] = await tx.select({ id: users.id }).from(users).where(eq(users.email, u.email));
      ids[u.email] = existing?.id ?? (await tx.insert(users).values({ email: u.email, name: u.name, passwordHash: await hashPassword(DEMO_PASSWORD) }).returning())[0]!.id;
    }
    const ownerId = ids[DEMO_USERS[0]!.email]!;
    const [found] = await tx.select({ id: studies.id }).from(studies).where(and(eq(studies.name, DEMO_STUDY_NAME), eq(studies.createdBy, ownerId)));
    if (found) return { studyId: found.id, created: false };

    const [study] = await tx.insert(studies).values({ name: DEMO_STUDY_NAME, description: DEMO_STUDY_DESCRIPTION, createdBy: ownerId }).returning();
    const studyId = study!.id;
    await recordEvent(tx, { studyId, actorId: ownerId, action: "study.created", summary: `created the Study “${DEMO_STUDY_NAME}”` });
    for (const u of DEMO_USERS) {
      await tx.insert(memberships).values({ studyId, userId: ids[u.email]!, role: u.role });
      if (u.role !== "owner") {
        await recordEvent(tx, { studyId, actorId: ids[u.email]!, action: "invitation.accepted", summary: `joined the Study as ${u.role}` });
      }
    }
    return { studyId, created: true };
  });
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const { db, pool } = connect(process.env.DATABASE_URL ?? "", { max: 2 });
  const { created } = await seedDemo(db);
  console.log(created ? "Demo Study created." : "Demo Study already present.");
  await pool.end();
}
