/**
 * IUCN Red List criterion E (quantitative analysis) against a Risk run's
 * quasi-extinction probabilities (METHODS.md §4):
 * CR ≥ 50 % within 10 years or 3 generations, whichever is longer;
 * EN ≥ 20 % within 20 years or 5 generations, whichever is longer;
 * VU ≥ 10 % within 100 years [pub: IUCN Red List categories and criteria].
 * The generation-based horizons are capped at 100 years: that cap is recalled
 * from memory, not checked against the IUCN text.
 *
 * Generation length is the mean age of parents (analyzeMatrix(…).lifeHistory
 * .meanAgeOfParents, in projection intervals). The probability "within h
 * years" is the run's cumulative first-passage probability at ⌊h⌋ years.
 */
import type { StochasticResult } from "../demography/index";

export type CriterionECategory = "CR" | "EN" | "VU";

/** The thresholds of criterion E. */
export const CRITERION_E = [
  { category: "CR", name: "Critically Endangered", probability: 0.5, years: 10, generations: 3 },
  { category: "EN", name: "Endangered", probability: 0.2, years: 20, generations: 5 },
  { category: "VU", name: "Vulnerable", probability: 0.1, years: 100, generations: null },
] as const satisfies readonly { category: CriterionECategory; name: string; probability: number; years: number; generations: number | null }[];

/** Cap on the generation-based horizons (years) [memory]. */
export const CRITERION_E_MAX_YEARS = 100;

export const CRITERION_E_CAUTION =
  "Red List listing is the responsible authority's process (IUCN assessors and reviewers, or the national or regional authority applying the criteria); these numbers only inform it. They depend on the model, its data and its assumptions, which the assessment must document and review; they support and do not replace expert judgement.";

export interface CriterionECheck {
  readonly category: CriterionECategory;
  readonly name: string;
  /** Probability the criterion asks for (0–1). */
  readonly probabilityThreshold: number;
  /** Horizon the criterion asks for, in years (may be fractional, e.g. 3 × 11.3). */
  readonly horizonYears: number | null;
  /** How that horizon was set, in words. */
  readonly horizonBasis: string;
  /** The same horizon in whole projection intervals (⌊years / yearsPerInterval⌋). */
  readonly horizonIntervals: number | null;
  /** True when the run reached that horizon. */
  readonly covered: boolean;
  /** Year (projection interval) at which the probability below was read. */
  readonly evaluatedAt: number;
  /** Quasi-extinction probability by `evaluatedAt`, with its 95 % Wilson interval. */
  readonly probability: number;
  readonly lower: number;
  readonly upper: number;
  /** met: the probability reaches the threshold; not-met: it does not; undetermined: the run is too short or the generation length unknown. */
  readonly status: "met" | "not-met" | "undetermined";
  /** True when the 95 % interval straddles the threshold: more replicates could change the status. */
  readonly uncertain: boolean;
  readonly explanation: string;
}

export interface CriterionEAssessment {
  readonly checks: CriterionECheck[];
  /** The most severe category whose threshold is met, or null. */
  readonly highestMet: CriterionECategory | null;
  readonly generationLength: { readonly intervals: number; readonly years: number } | null;
  readonly yearsPerInterval: number;
  readonly notes: string[];
  readonly caution: string;
}

const UNIT_YEARS: Record<string, number> = { year: 1, yr: 1, y: 1, annum: 1, decade: 10, month: 1 / 12, week: 7 / 365.25, day: 1 / 365.25, generation: NaN };

/**
 * Years in one projection interval from a life cycle's time-step unit
 * ("year", "2 years", "month", "5-year", "decade", "week", "day"); null when
 * the unit is not a length of time this knows (then ask the user).
 */
export function yearsPerTimeStep(unit: string): number | null {
  const m = /^\s*(\d+(?:\.\d+)?)?\s*-?\s*([a-z]+?)s?\s*$/i.exec(unit);
  if (!m) return null;
  const count = m[1] === undefined ? 1 : Number(m[1]);
  const per = UNIT_YEARS[m[2]!.toLowerCase()];
  if (per === undefined || !Number.isFinite(per) || !(count > 0)) return null;
  return count * per;
}

const pct = (p: number) => `${(100 * p).toFixed(p < 0.001 && p > 0 ? 2 : 1)} %`;
const num = (x: number) => (Number.isInteger(x) ? String(x) : x.toFixed(1));

/**
 * Compare a Risk run's quasi-extinction probabilities with criterion E.
 * `generationLength` is in projection intervals (null when unknown);
 * `yearsPerInterval` converts intervals to years (1 for annual matrices).
 */
export function iucnCriterionE(result: StochasticResult, generationLength: number | null, options: { yearsPerInterval?: number } = {}): CriterionEAssessment {
  const perInterval = options.yearsPerInterval ?? 1;
  if (!(perInterval > 0) || !Number.isFinite(perInterval)) throw new RangeError(`yearsPerInterval must be a number above 0; got ${perInterval}.`);
  const G = generationLength !== null && Number.isFinite(generationLength) && generationLength > 0 ? generationLength * perInterval : null;
  const T = result.horizon;
  const runYears = T * perInterval;
  const byYear = result.quasiExtinction.byYear;
  const at = (t: number) => ({ probability: byYear.probability[t]!, lower: byYear.lower[t]!, upper: byYear.upper[t]! });
  const notes: string[] = [];

  const checks: CriterionECheck[] = CRITERION_E.map((c) => {
    let horizonYears: number | null;
    let basis: string;
    if (c.generations === null) {
      horizonYears = c.years;
      basis = `${c.years} years`;
    } else if (G === null) {
      horizonYears = null;
      basis = `${c.years} years or ${c.generations} generations, whichever is longer; the generation length is unknown`;
    } else {
      const byGenerations = c.generations * G;
      if (byGenerations <= c.years) {
        horizonYears = c.years;
        basis = `${c.years} years (longer than ${c.generations} generations = ${num(byGenerations)} years)`;
      } else if (byGenerations > CRITERION_E_MAX_YEARS) {
        horizonYears = CRITERION_E_MAX_YEARS;
        basis = `${c.generations} generations = ${num(byGenerations)} years, capped at ${CRITERION_E_MAX_YEARS} years (the cap is recalled, not checked against the IUCN text)`;
      } else {
        horizonYears = byGenerations;
        basis = `${c.generations} generations of ${num(G)} years = ${num(byGenerations)} years`;
      }
    }
    const minimumYears = horizonYears ?? c.years;
    const intervals = Math.floor(minimumYears / perInterval + 1e-9);
    const covered = horizonYears !== null && intervals <= T;
    const evaluatedAt = covered ? intervals : horizonYears === null ? Math.min(intervals, T) : T;
    const p = at(evaluatedAt);
    const uncertain = p.lower < c.probability && c.probability <= p.upper;
    const need = `${c.name} (${c.category}) needs a probability of at least ${pct(c.probability)}`;
    let status: CriterionECheck["status"];
    let explanation: string;
    if (covered) {
      status = p.probability >= c.probability ? "met" : "not-met";
      explanation = `${need} within ${num(horizonYears!)} years; the run gives ${pct(p.probability)} (95 % interval ${pct(p.lower)}–${pct(p.upper)}) by year ${num(evaluatedAt * perInterval)}.`;
    } else if (p.probability >= c.probability) {
      // The cumulative probability only grows with time, so reaching the threshold earlier settles it.
      status = "met";
      explanation = `${need} within ${horizonYears === null ? `at least ${c.years}` : num(horizonYears)} years; the run already gives ${pct(p.probability)} by year ${num(evaluatedAt * perInterval)}, and the probability can only grow with a longer horizon.`;
    } else {
      status = "undetermined";
      explanation =
        horizonYears === null
          ? `${need} within ${c.years} years or ${c.generations} generations, whichever is longer, but the generation length is unknown; by year ${num(evaluatedAt * perInterval)} the run gives ${pct(p.probability)}.`
          : `${need} within ${num(horizonYears)} years, but the run covers only ${num(runYears)} years (${pct(p.probability)} by then). Run again with a horizon of at least ${Math.ceil(horizonYears / perInterval - 1e-9)} ${perInterval === 1 ? "years" : "projection intervals"}.`;
    }
    if (uncertain && status !== "undetermined") explanation += " The 95 % interval straddles the threshold: more replicates could change this.";
    return {
      category: c.category,
      name: c.name,
      probabilityThreshold: c.probability,
      horizonYears,
      horizonBasis: basis,
      horizonIntervals: horizonYears === null ? null : intervals,
      covered,
      evaluatedAt,
      probability: p.probability,
      lower: p.lower,
      upper: p.upper,
      status,
      uncertain,
      explanation,
    };
  });

  const highestMet = checks.find((c) => c.status === "met")?.category ?? null;
  if (G === null) notes.push("The generation length (mean age of parents) is unknown, so the generation-based horizons of CR and EN could not be set.");
  if (result.threshold.value > 0) {
    notes.push(
      `Criterion E speaks of extinction; these are probabilities of falling to ${result.threshold.value} or fewer individuals (quasi-extinction), which are higher than those of extinction itself. Say which threshold was used and why.`,
    );
  }
  if (!result.complete) notes.push("Provisional: not all replicates of the run have finished.");
  notes.push(`The ${CRITERION_E_MAX_YEARS}-year cap on the generation-based horizons is recalled from memory, not checked against the IUCN text.`);
  return {
    checks,
    highestMet,
    generationLength: G === null ? null : { intervals: G / perInterval, years: G },
    yearsPerInterval: perInterval,
    notes,
    caution: CRITERION_E_CAUTION,
  };
}
