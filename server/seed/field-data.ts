/**
 * Demo Field data for the Brannock fen newt (an invented species at two
 * invented wetlands): fifteen years of spring counts per site with counts by
 * stage, and the marked newts followed from one spring census to the next.
 * The records are simulated from the demo life cycles' invented rates with a
 * fixed seed and stored through the same path as an upload, raw file included.
 */
import { and, eq } from "drizzle-orm";
import { createRandom, type Random } from "../../shared/demography";
import type { Db } from "../db/client";
import { datasets, runs, users } from "../db/schema";
import type { JobSender } from "../runs/queue";
import { RUN_KINDS } from "../runs/registry";
import { createRun } from "../runs/service";
import { createDataset } from "../services/field-data";

export const DEMO_COUNTS_NAME = "Spring pond counts 2012–2026";
export const DEMO_FATES_NAME = "Marked newts 2012–2026";
const EDITOR_EMAIL = "ellis.reed@example.org";
const YEARS = Array.from({ length: 15 }, (_, k) => 2012 + k);

interface Site {
  name: string;
  /** Yearly survival of efts, subadults, adults; maturation; recruits (female efts at the next census) per adult female. */
  s_j: number;
  s_s: number;
  g: number;
  s_a: number;
  recruits: number;
  /** Spring 2012 females by stage, and the SD of the yearly log growth shock. */
  start: [number, number, number];
  shock: number;
  /** Newts marked in all. */
  marked: number;
  /** A year the counts were not made. */
  missed: number | null;
}

const SITES: Site[] = [
  { name: "Brannock Fen", s_j: 0.45, s_s: 0.6, g: 0.4, s_a: 0.76, recruits: 1.925, start: [160, 110, 95], shock: 0.12, marked: 212, missed: null },
  { name: "Kessel Marsh", s_j: 0.41, s_s: 0.56, g: 0.36, s_a: 0.7, recruits: 1.44, start: [120, 85, 75], shock: 0.16, marked: 143, missed: 2019 },
];

const STAGES = ["Eft", "Subadult", "Adult"] as const;

function countsCsv(rng: Random): string {
  const lines = ["year,site,females_counted,efts,subadults,adults"];
  for (const site of SITES) {
    let [e, s, a] = site.start;
    for (const year of YEARS) {
      if (year !== site.missed) {
        // Counts see about 80 % of the females present, with Poisson noise.
        const seen = (x: number) => rng.poisson(0.8 * x);
        const ce = seen(e);
        const cs = seen(s);
        const ca = seen(a);
        lines.push(`${year},${site.name},${ce + cs + ca},${ce},${cs},${ca}`);
      }
      const shock = Math.exp(site.shock * rng.normal() - (site.shock * site.shock) / 2);
      const ne = site.recruits * a * shock;
      const ns = site.s_j * e * shock + site.s_s * (1 - site.g) * s * shock;
      const na = site.s_s * site.g * s * shock + site.s_a * a * shock;
      [e, s, a] = [ne, ns, na];
    }
  }
  return lines.join("\n");
}

function fatesCsv(rng: Random): string {
  const lines = ["newt_id,year,site,stage,fate,recruits"];
  for (const site of SITES) {
    const prefix = site.name === "Brannock Fen" ? "BF" : "KM";
    let marked = 0;
    const perYear = Math.ceil(site.marked / YEARS.length);
    for (const year0 of YEARS) {
      // Newts marked this spring: efts mostly, some older newts in the first year.
      const batch = Math.min(perYear, site.marked - marked);
      for (let b = 0; b < batch; b++) {
        const id = `${prefix}-${String(++marked).padStart(3, "0")}`;
        let stage = year0 === YEARS[0] ? [0, 1, 2][b % 3]! : rng.uniform() < 0.8 ? 0 : 1;
        for (let year = year0; year <= YEARS[YEARS.length - 1]!; year++) {
          const recruits = stage === 2 ? String(rng.poisson(site.recruits)) : "0";
          if (year === YEARS[YEARS.length - 1]) {
            lines.push(`${id},${year},${site.name},${STAGES[stage]},,${recruits}`);
            break;
          }
          const survive = stage === 0 ? site.s_j : stage === 1 ? site.s_s : site.s_a;
          if (rng.uniform() >= survive) {
            // Found dead or never seen again; a marked newt missing two springs running is counted dead.
            lines.push(`${id},${year},${site.name},${STAGES[stage]},dead,${recruits}`);
            break;
          }
          const next = stage === 0 ? 1 : stage === 1 ? (rng.uniform() < site.g ? 2 : 1) : 2;
          if (rng.uniform() < 0.06) {
            // Alive but not found at the next census: fate unknown, the record ends.
            lines.push(`${id},${year},${site.name},${STAGES[stage]},,${recruits}`);
            break;
          }
          lines.push(`${id},${year},${site.name},${STAGES[stage]},${STAGES[next]},${recruits}`);
          stage = next;
        }
      }
    }
  }
  return lines.join("\n");
}

/** Adds the demo datasets to the demo Study and queues a λ bootstrap Run, unless they are there; returns whether anything was added. */
export async function seedFieldData(db: Db, jobs: JobSender, studyId: string): Promise<boolean> {
  const [existing] = await db.select({ id: datasets.id }).from(datasets).where(and(eq(datasets.studyId, studyId), eq(datasets.name, DEMO_FATES_NAME)));
  if (existing) return false;
  const [editor] = await db.select({ id: users.id }).from(users).where(eq(users.email, EDITOR_EMAIL));
  if (!editor) return false;
  const rng = createRandom(20_261_202, 7);
  await createDataset(db, studyId, editor.id, { originalname: "brannock-newt-counts.csv", buffer: Buffer.from(countsCsv(rng), "utf8") }, {
    kind: "counts",
    name: DEMO_COUNTS_NAME,
    mapping: {
      time: "year",
      count: "females_counted",
      site: "site",
      stages: [
        { stage: "Eft", column: "efts" },
        { stage: "Subadult", column: "subadults" },
        { stage: "Adult", column: "adults" },
      ],
    },
    options: { delimiter: "auto", decimalComma: "auto" },
  });
  const fates = await createDataset(db, studyId, editor.id, { originalname: "brannock-newt-marks.csv", buffer: Buffer.from(fatesCsv(rng), "utf8") }, {
    kind: "stage-fates",
    name: DEMO_FATES_NAME,
    mapping: { individual: "newt_id", year: "year", stage: "stage", fate: "fate", offspring: "recruits", site: "site" },
    options: { delimiter: "auto", decimalComma: "auto", deadValue: "dead", stages: [...STAGES] },
  });
  const [run] = await db.select({ id: runs.id }).from(runs).where(eq(runs.datasetId, fates.id)).limit(1);
  if (!run) {
    await createRun(db, { kinds: RUN_KINDS, jobs }, { studyId, lifeCycleId: null, datasetId: fates.id }, editor.id, {
      kind: "bootstrap",
      settings: { analysis: { census: "pre-breeding", offspringSurvival: 1, method: "wilson", site: "Kessel Marsh" }, resamples: 2000, seed: 20_261_202 },
    });
  }
  return true;
}
