/**
 * Demo scenarios (Levers) for the invented Brannock fen newt: management
 * actions invented for the demo, with invented costs in thousand € a year.
 * Nothing here describes a real population or a real programme.
 */
import { and, asc, eq } from "drizzle-orm";
import type { LifeCycle, Scenario } from "../../shared/lifecycle";
import type { Db } from "../db/client";
import { runs } from "../db/schema";
import type { JobSender } from "../runs/queue";
import { RUN_KINDS } from "../runs/registry";
import { createRun } from "../runs/service";

const rate = (rateId: string) => ({ kind: "rate" as const, rateId });

const DEMO_SCENARIOS: Record<string, Scenario[]> = {
  "Kessel Marsh newts": [
    {
      id: "sc_fence",
      name: "Fence the road crossing",
      action: "Amphibian fence and two tunnels where the marsh access road crosses the spring migration route (invented demo action).",
      cost: 18,
      changes: [{ id: "ch_fence_sa", target: rate("vr_sa"), op: "multiply", value: 1.08, achievable: 1.12 }],
    },
    {
      id: "sc_headstart",
      name: "Head-start efts",
      action: "Rear eggs in pond enclosures and release efts after metamorphosis (invented demo action).",
      cost: 25,
      changes: [{ id: "ch_head_se", target: rate("vr_se"), op: "multiply", value: 1.5, achievable: 2 }],
    },
    {
      id: "sc_scrub",
      name: "Clear scrub from the fen margin",
      action: "Winter scrub clearance on the southern margin to open damp grassland for efts and subadults (invented demo action).",
      cost: 9,
      changes: [
        { id: "ch_scrub_sj", target: rate("vr_sj"), op: "add", value: 0.04, achievable: 0.07 },
        { id: "ch_scrub_ss", target: rate("vr_ss"), op: "add", value: 0.03 },
      ],
    },
  ],
  "Brannock Fen newts": [
    {
      id: "sc_grazing",
      name: "Keep cattle off the pond edges",
      action: "Temporary fencing of the pond margins from April to July (invented demo action).",
      cost: 4,
      changes: [{ id: "ch_graze_sj", target: rate("vr_sj"), op: "multiply", value: 1.1, achievable: 1.2 }],
    },
    {
      id: "sc_drought",
      name: "Dry springs (no action)",
      action: "What two dry springs in five would do to egg survival if nothing is done (invented demo case).",
      changes: [{ id: "ch_dry_se", target: rate("vr_se"), op: "multiply", value: 0.8 }],
    },
  ],
};

/** The demo life cycle with its invented scenarios. */
export function withDemoScenarios(doc: LifeCycle): LifeCycle {
  const scenarios = DEMO_SCENARIOS[doc.name];
  return scenarios ? { ...doc, scenarios } : doc;
}

/**
 * Queues a Risk run of the demo's fence scenario with the settings (and seed)
 * of the life cycle's first Risk run, so the Levers comparison shows a
 * scenario's quasi-extinction probability beside the baseline's.
 */
export async function seedScenarioRun(db: Db, jobs: JobSender, studyId: string, lifeCycleId: string, userId: string): Promise<void> {
  const [baseline] = await db.select().from(runs).where(and(eq(runs.lifeCycleId, lifeCycleId), eq(runs.kind, "risk"))).orderBy(asc(runs.createdAt)).limit(1);
  if (!baseline) return;
  await createRun(db, { kinds: RUN_KINDS, jobs }, { studyId, lifeCycleId }, userId, {
    kind: "risk",
    settings: { ...(baseline.settings as Record<string, unknown>), scenarioId: "sc_fence" },
  });
}
