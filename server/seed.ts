import { and, eq } from "drizzle-orm";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, type LifeCycle } from "../shared/lifecycle";
import type { Role } from "../shared/schemas/studies";
import { hashPassword } from "./auth/secrets";
import { connect, type Db } from "./db/client";
import { lifeCycles, memberships, runs, studies, users } from "./db/schema";
import type { JobSender } from "./runs/queue";
import { createJobSender } from "./runs/queue";
import { RUN_KINDS } from "./runs/registry";
import { createRun } from "./runs/service";
import { recordEvent } from "./services/audit";
import { takeSnapshot } from "./services/snapshots";
import { seedScenarioRun, withDemoScenarios } from "./seed/levers";
import { seedReview } from "./seed/review";
import { seedDemoUncertaintyRun, withDemoUncertainty } from "./seed/uncertainty";
import { seedFieldData } from "./seed/field-data";
import { seedDemoClimate } from "./seed/climate";

/** Invented people, species and places: the demo must never pass for real data. */
export const DEMO_PASSWORD = "stagewright-demo";
export const DEMO_USERS: { email: string; name: string; role: Role }[] = [
  { email: "olwen.marsh@example.org", name: "Olwen Marsh", role: "owner" },
  { email: "ellis.reed@example.org", name: "Ellis Reed", role: "editor" },
  { email: "rowan.vale@example.org", name: "Rowan Vale", role: "reviewer" },
];
export const DEMO_STUDY_NAME = "Brannock fen newt — Brannock Fen and Kessel Marsh";
const DEMO_STUDY_DESCRIPTION =
  "Demo data: an invented amphibian (the Brannock fen newt, Paludotriton brannockensis) at two invented wetland sites, " +
  "one life cycle per site with rates from invented mark–recapture seasons, used to show what Stagewright does. Nothing here describes a real population.";

interface DemoSite {
  name: string;
  /** Egg-to-first-census survival, eft survival, subadult survival, maturation, adult survival, eggs per female. */
  rates: { s_e: number; s_j: number; s_s: number; g: number; s_a: number; m: number };
  se: { s_e: number; s_j: number; s_s: number; g: number; s_a: number; m: number };
  marked: number;
}

/** Invented vital rates for the two invented sites (Brannock Fen grows; Kessel Marsh declines). */
const DEMO_SITES: DemoSite[] = [
  { name: "Brannock Fen", rates: { s_e: 0.035, s_j: 0.45, s_s: 0.6, g: 0.4, s_a: 0.76, m: 110 }, se: { s_e: 0.006, s_j: 0.05, s_s: 0.04, g: 0.06, s_a: 0.03, m: 14 }, marked: 212 },
  { name: "Kessel Marsh", rates: { s_e: 0.03, s_j: 0.41, s_s: 0.56, g: 0.36, s_a: 0.7, m: 96 }, se: { s_e: 0.007, s_j: 0.06, s_s: 0.05, g: 0.07, s_a: 0.04, m: 17 }, marked: 143 },
];

function demoLifeCycle(site: DemoSite): LifeCycle {
  const source = `${site.name} mark–recapture, 2012–2026 (${site.marked} marked newts; invented demo data)`;
  const rate = (id: string, name: keyof DemoSite["rates"], notes: string, unit?: string) => ({
    id,
    name,
    value: site.rates[name],
    se: site.se[name],
    notes,
    source,
    ...(unit ? { unit } : {}),
  });
  return LifeCycleSchema.parse(withDemoUncertainty({
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: `${site.name} newts`,
    census: "pre-breeding",
    timeStepUnit: "year",
    notes: "Pre-breeding census in early spring, females only. Invented demo data: not a real population.",
    stages: [
      { id: "st_eft", name: "Eft", position: { x: 80, y: 200 }, notes: "First-year juveniles on land" },
      { id: "st_sub", name: "Subadult", position: { x: 340, y: 200 } },
      { id: "st_adult", name: "Adult", position: { x: 600, y: 200 }, notes: "Breeding females" },
    ],
    rates: [
      rate("vr_se", "s_e", "Survival from egg to the first spring census"),
      rate("vr_sj", "s_j", "Annual survival of efts"),
      rate("vr_ss", "s_s", "Annual survival of subadults"),
      rate("vr_g", "g", "Probability a surviving subadult matures in a year"),
      rate("vr_sa", "s_a", "Annual survival of adult females"),
      rate("vr_m", "m", "Eggs laid per adult female per season", "eggs per female"),
    ],
    transitions: [
      { id: "tr_eft_sub", from: "st_eft", to: "st_sub", kind: "growth", rate: "s_j" },
      { id: "tr_sub_sub", from: "st_sub", to: "st_sub", kind: "stasis", rate: "s_s * (1 - g)" },
      { id: "tr_sub_adult", from: "st_sub", to: "st_adult", kind: "growth", rate: "s_s * g" },
      { id: "tr_adult_adult", from: "st_adult", to: "st_adult", kind: "stasis", rate: "s_a" },
      { id: "tr_adult_eft", from: "st_adult", to: "st_eft", kind: "reproduction", rate: "m * 0.5 * s_e", notes: "Female eggs (sex ratio 1:1) surviving to the first census" },
    ],
  }));
}

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
    for (const site of DEMO_SITES) {
      const document = withDemoScenarios(demoLifeCycle(site));
      const [lc] = await tx
        .insert(lifeCycles)
        .values({ studyId, name: document.name, document, schemaVersion: LIFE_CYCLE_SCHEMA_VERSION, createdBy: ids[DEMO_USERS[1]!.email]!, updatedBy: ids[DEMO_USERS[1]!.email]! })
        .returning();
      await recordEvent(tx, { studyId, actorId: ids[DEMO_USERS[1]!.email]!, action: "life_cycle.created", summary: `created the life cycle “${document.name}”`, details: { lifeCycleId: lc!.id } });
      await takeSnapshot(tx, lc!.id, ids[DEMO_USERS[1]!.email]!, "Rates from the mark–recapture seasons 2012–2026");
    }
    await seedReview(tx, studyId, { editor: { id: ids[DEMO_USERS[1]!.email]!, name: DEMO_USERS[1]!.name, role: "editor" }, reviewer: { id: ids[DEMO_USERS[2]!.email]!, name: DEMO_USERS[2]!.name, role: "reviewer" } });
    return { studyId, created: true };
  });
}

/**
 * Queues the demo's Risk run on the declining site unless it has one; the
 * worker that `npm start` runs computes it like any other run.
 */
export async function seedDemoRun(db: Db, jobs: JobSender, studyId: string): Promise<boolean> {
  const [lc] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.studyId, studyId), eq(lifeCycles.name, "Kessel Marsh newts")));
  if (!lc) return false;
  const [existing] = await db.select({ id: runs.id }).from(runs).where(eq(runs.lifeCycleId, lc.id)).limit(1);
  if (existing) return false;
  const [editor] = await db.select({ id: users.id }).from(users).where(eq(users.email, DEMO_USERS[1]!.email));
  await createRun(db, { kinds: RUN_KINDS, jobs }, { studyId, lifeCycleId: lc.id }, editor!.id, {
    kind: "risk",
    settings: {
      environment: {
        kind: "vital-rates",
        rates: [
          { rateId: "vr_se", distribution: "beta", mean: 0.03, sd: 0.012 },
          { rateId: "vr_sa", distribution: "beta", mean: 0.7, sd: 0.08 },
          { rateId: "vr_m", distribution: "lognormal", mean: 96, sd: 25 },
        ],
        correlations: [{ a: "vr_se", b: "vr_sa", r: 0.4 }],
      },
      demographic: true,
      initial: [120, 85, 75],
      horizon: 100,
      replicates: 5000,
      threshold: { value: 20 },
      seed: 20261201,
    },
  });
  await seedScenarioRun(db, jobs, studyId, lc.id, editor!.id);
  return true;
}

if (process.argv[1] && path.resolve(process.argv[1]) === fileURLToPath(import.meta.url)) {
  const url = process.env.DATABASE_URL ?? "";
  const { db, pool } = connect(url, { max: 2 });
  const jobs = createJobSender(url);
  const { created, studyId } = await seedDemo(db);
  console.log(created ? "Demo Study created." : "Demo Study already present.");
  if (await seedDemoRun(db, jobs, studyId)) console.log("Demo Risk run queued: the worker computes it in the background.");
  if (await seedDemoUncertaintyRun(db, jobs, studyId)) console.log("Demo Monte Carlo run queued.");
  if (await seedFieldData(db, jobs, studyId)) console.log("Demo Field data added; its λ bootstrap Run is queued.");
  if (await seedDemoClimate(db, jobs, studyId)) console.log("Demo thermal responses and warming run added.");
  await jobs.stop();
  await pool.end();
}
