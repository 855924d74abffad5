/**
 * Demo data for Uncertainty: the invented newts' efts were followed as
 * counts (k of n survived), egg-to-census survival and adult survival come
 * from the same invented capture histories (a correlated pair), and the
 * declining site gets a finished Monte Carlo Run, computed by the worker
 * like any other.
 */
import { and, eq } from "drizzle-orm";
import type { LifeCycle } from "../../shared/lifecycle";
import type { Db } from "../db/client";
import { lifeCycles, runs, users } from "../db/schema";
import type { JobSender } from "../runs/queue";
import { RUN_KINDS } from "../runs/registry";
import { createRun } from "../runs/service";

/** Invented eft counts per site: marked efts and how many were seen again a year later. */
const EFT_COUNTS: Record<string, { k: number; n: number }> = {
  "Brannock Fen newts": { k: 38, n: 84 },
  "Kessel Marsh newts": { k: 25, n: 61 },
};

/** The demo document with eft survival as counts and a correlation between s_e and s_a. */
export function withDemoUncertainty(doc: LifeCycle): LifeCycle {
  const counts = EFT_COUNTS[doc.name];
  if (!counts) return doc;
  return {
    ...doc,
    rates: doc.rates.map((r) => {
      if (r.name !== "s_j") return r;
      const { se: _se, ...rest } = r;
      return { ...rest, value: Number((counts.k / counts.n).toFixed(3)), counts };
    }),
    correlations: [{ a: "vr_se", b: "vr_sa", r: 0.3 }],
  };
}

/** Queues a 10,000-draw Monte Carlo Run on the declining site unless it has one. */
export async function seedDemoUncertaintyRun(db: Db, jobs: JobSender, studyId: string): Promise<boolean> {
  const [lc] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.studyId, studyId), eq(lifeCycles.name, "Kessel Marsh newts")));
  if (!lc) return false;
  const [existing] = await db.select({ id: runs.id }).from(runs).where(and(eq(runs.lifeCycleId, lc.id), eq(runs.kind, "uncertainty"))).limit(1);
  if (existing) return false;
  const [editor] = await db.select({ id: users.id }).from(users).where(eq(users.email, "ellis.reed@example.org"));
  await createRun(db, { kinds: RUN_KINDS, jobs }, { studyId, lifeCycleId: lc.id }, editor!.id, { kind: "uncertainty", settings: { draws: 10_000, seed: 20261202 } });
  return true;
}
