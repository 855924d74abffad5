/**
 * Demo Climate data: invented thermal responses for three vital rates of the
 * invented Brannock fen newt at Brannock Fen, an invented warming trajectory
 * of the fen's mean breeding-season water temperature, and a warming Run of
 * stochastic replicates computed by the worker. Nothing here is a real
 * species, place or measurement.
 */
import { and, eq } from "drizzle-orm";
import { upgradeLifeCycle, type LifeCycle } from "../../shared/lifecycle";
import type { ThermalResponse, WarmingTrajectory } from "../../shared/lifecycle/thermal";
import type { Db } from "../db/client";
import { lifeCycles, runs, users } from "../db/schema";
import type { JobSender } from "../runs/queue";
import { RUN_KINDS } from "../runs/registry";
import { createRun } from "../runs/service";
import { updateLifeCycle } from "../services/life-cycles";

const EDITOR_EMAIL = "ellis.reed@example.org";
const LIFE_CYCLE_NAME = "Brannock Fen newts";
/** Mean breeding-season water temperature of the invented fen, °C. */
const BASELINE = 11.5;

/** Invented responses: warmer water raises eft mortality, egg survival and egg laying peak and then fail. */
export const DEMO_RESPONSES: Record<string, ThermalResponse> = {
  s_j: { form: "arrhenius", appliesTo: "hazard", activationEnergy: 0.65, referenceTemperature: BASELINE, valueAtReference: Number((-Math.log(0.45)).toFixed(4)) },
  s_e: { form: "gaussian-quadratic", appliesTo: "rate", optimum: 12.5, width: 3.5, criticalMaximum: 19.5, valueAtOptimum: 0.036 },
  m: { form: "briere", appliesTo: "rate", coefficient: 0.4, lower: 4, upper: 22 },
};

export const DEMO_TRAJECTORY: WarmingTrajectory = { kind: "trend", startYear: 2026, years: 100, baseline: BASELINE, trendPerDecade: 0.6, sd: 0.9 };

/** The Brannock Fen life cycle with the demo's thermal responses and Climate settings. */
export function withDemoClimate(doc: LifeCycle): LifeCycle {
  return {
    ...doc,
    rates: doc.rates.map((r) => (DEMO_RESPONSES[r.name] ? { ...r, thermal: DEMO_RESPONSES[r.name] } : r)),
    climate: { range: { min: 0, max: 25 }, trajectory: DEMO_TRAJECTORY },
  };
}

/**
 * Gives the demo's Brannock Fen life cycle its thermal responses (a saved
 * edit by the demo editor, with its activity row) and queues a warming Run,
 * unless it has them already. Returns true when something was added.
 */
export async function seedDemoClimate(db: Db, jobs: JobSender, studyId: string): Promise<boolean> {
  const [lc] = await db.select().from(lifeCycles).where(and(eq(lifeCycles.studyId, studyId), eq(lifeCycles.name, LIFE_CYCLE_NAME)));
  const [editor] = await db.select({ id: users.id }).from(users).where(eq(users.email, EDITOR_EMAIL));
  if (!lc || !editor) return false;
  const doc = upgradeLifeCycle(lc.document);
  let changed = false;
  if (!doc.rates.some((r) => r.thermal)) {
    await updateLifeCycle(db, lc.id, editor.id, lc.version, withDemoClimate(doc));
    changed = true;
  }
  const [existing] = await db.select({ id: runs.id }).from(runs).where(and(eq(runs.lifeCycleId, lc.id), eq(runs.kind, "warming"))).limit(1);
  if (!existing) {
    await createRun(db, { kinds: RUN_KINDS, jobs }, { studyId, lifeCycleId: lc.id }, editor.id, {
      kind: "warming",
      settings: { trajectory: DEMO_TRAJECTORY, replicates: 1000, initialTotal: 400, threshold: 40, seed: 20261202 },
    });
    changed = true;
  }
  return changed;
}
