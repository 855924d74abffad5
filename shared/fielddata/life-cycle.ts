/**
 * "Start a life cycle from these estimates": the estimated stage-fate matrix
 * as a Stagewright life-cycle document whose named rates carry the values,
 * their standard errors, intervals and counts, and the dataset as source.
 * Survival-and-growth entries become rates p_<from>_<to>; mean offspring per
 * stage become m_<stage>; reproduction arrows are formulas of those rates,
 * built for the census timing chosen (see estimate.ts).
 */
import { LIFE_CYCLE_SCHEMA_VERSION, rateNameProblem } from "../lifecycle";
import type { StageFateEstimate } from "./estimate";

export interface LifeCycleSource {
  name: string;
  datasetId: string;
  datasetName: string;
  /** e.g. "2012–2026, Brannock Fen". */
  scope: string;
}

function slug(name: string, k: number): string {
  const s = name
    .toLowerCase()
    .normalize("NFKD")
    .replace(/[^a-z0-9]+/g, "_")
    .replace(/^_+|_+$/g, "")
    .slice(0, 20);
  const candidate = /^[a-z]/.test(s) ? s : `s${k + 1}${s ? `_${s}` : ""}`;
  return rateNameProblem(`p_${candidate}`) === null ? candidate : `s${k + 1}`;
}

const round = (x: number) => Number(x.toPrecision(10));

/** A plain life-cycle document (the caller validates it with LifeCycleSchema). */
export function lifeCycleFromEstimate(e: StageFateEstimate, source: LifeCycleSource): Record<string, unknown> {
  const slugs: string[] = [];
  e.stages.forEach((s, k) => {
    let base = slug(s, k);
    while (slugs.includes(base)) base = `${base}_${k + 1}`;
    slugs.push(base);
  });
  const stageId = (k: number) => `st_${k + 1}`;
  const method = e.method === "wilson" ? "Wilson" : "Clopper–Pearson";
  const level = Math.round(e.level * 100);
  const sourceText = `Field data “${source.datasetName}” (${source.scope})`;
  const rates: Record<string, unknown>[] = [];
  const transitions: Record<string, unknown>[] = [];
  const rateName = new Map<string, string>();

  for (const t of e.transitions) {
    if (t.k === 0) continue;
    const name = `p_${slugs[t.to]}_${slugs[t.from]}`;
    rateName.set(`${t.to},${t.from}`, name);
    rates.push({
      id: `vr_p_${t.to + 1}_${t.from + 1}`,
      name,
      value: round(t.p),
      se: round(t.se),
      ...(t.ci ? { ci: { lower: round(t.ci.lower), upper: round(t.ci.upper), level: t.ci.level } } : {}),
      counts: { k: t.k, n: t.n },
      scale: "probability",
      datasetId: source.datasetId,
      source: sourceText,
      notes: `${e.stages[t.from]} → ${e.stages[t.to]}: ${t.k} of ${t.n} individuals; ${level} % ${method} interval.`,
    });
    const kind = t.from === t.to ? "stasis" : t.to > t.from ? "growth" : "shrinkage";
    transitions.push({ id: `tr_${t.to + 1}_${t.from + 1}`, from: stageId(t.from), to: stageId(t.to), kind, rate: name });
  }

  const fecundityName = new Map<number, string>();
  for (const f of e.fecundity) {
    if (f.mean === null || f.mean <= 0) continue;
    const name = `m_${slugs[f.stage]}`;
    fecundityName.set(f.stage, name);
    rates.push({
      id: `vr_m_${f.stage + 1}`,
      name,
      value: round(f.mean),
      ...(f.se !== null ? { se: round(f.se) } : {}),
      unit: "offspring per individual",
      scale: "non-negative",
      datasetId: source.datasetId,
      source: sourceText,
      notes: `Mean offspring per ${e.stages[f.stage]} per breeding season, from ${f.n} record${f.n === 1 ? "" : "s"}.`,
    });
  }
  const s0 = e.census === "pre-breeding" && e.offspringSurvival !== 1;
  if (s0) {
    rates.push({
      id: "vr_s0",
      name: "s0",
      value: e.offspringSurvival,
      scale: "probability",
      notes: "Survival of offspring from birth to their first census, entered when the estimates were made (not estimated from the records).",
    });
  }

  for (const f of e.fertility) {
    let formula: string;
    if (e.census === "pre-breeding") {
      const m = fecundityName.get(f.from);
      if (!m) continue;
      formula = s0 ? `s0 * ${m}` : m;
    } else {
      const terms: string[] = [];
      for (let i = 0; i < e.stages.length; i++) {
        const p = rateName.get(`${i},${f.from}`);
        const m = fecundityName.get(i);
        if (p && m) terms.push(`${p} * ${m}`);
      }
      if (terms.length === 0) continue;
      formula = terms.join(" + ");
    }
    transitions.push({ id: `tr_f_${f.from + 1}`, from: stageId(f.from), to: stageId(f.to), kind: "reproduction", rate: formula });
  }

  const unseen = e.transitions.filter((t) => t.zeroCount && t.ci).map((t) => `${e.stages[t.from]} → ${e.stages[t.to]} (0 of ${t.n}, up to ${(t.ci!.upper * 100).toFixed(1)} %)`);
  const empty = e.n.flatMap((n, j) => (n === 0 ? [e.stages[j]] : []));
  const notes = [
    `Estimated from ${sourceText}, ${e.census} census${e.census === "pre-breeding" ? `, offspring survival to the first census ${e.offspringSurvival}` : ""}.`,
    unseen.length ? `Never observed, left out as arrows: ${unseen.join("; ")}.` : "",
    empty.length ? `No individuals with a known fate in: ${empty.join(", ")} — set those rates by hand.` : "",
    "Small samples bias λ (Fiske et al. 2008): check the sample size behind each rate.",
  ].filter(Boolean);

  return {
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: source.name,
    census: e.census,
    timeStepUnit: "year",
    notes: notes.join("\n"),
    stages: e.stages.map((name, k) => ({ id: stageId(k), name, position: { x: 80 + k * 240, y: 200 } })),
    rates,
    transitions,
  };
}
