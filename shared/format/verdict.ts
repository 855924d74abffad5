/**
 * λ in plain words: "declining about 5.5 % a year". λ is the factor by which
 * the population multiplies each time step once its stage structure has
 * settled, so (λ − 1) is the long-run change per step.
 */

export type Trend = "growing" | "declining" | "stable" | "dying-out";

export interface Verdict {
  trend: Trend;
  /** "growing about 3.1 % a year" */
  headline: string;
  /** A second sentence, e.g. the doubling or halving time; null when it does not apply. */
  detail: string | null;
}

/** Below this change per step (as a proportion), λ counts as stable: it rounds to 0.0 %. */
const STABLE = 0.0005;

const isWord = (unit: string) => /^[A-Za-z]+$/.test(unit);

/** "a year", "an hour", "per 2 years". */
export function perStep(unit: string): string {
  const u = unit.trim();
  if (!isWord(u)) return `per ${u}`;
  return /^(?:[aeio]|hour)/i.test(u) ? `an ${u}` : `a ${u}`;
}

/** "1 year", "3.5 years", "2 time steps (of 5 years)". */
export function steps(count: string, unit: string): string {
  const u = unit.trim();
  if (!isWord(u)) return `${count} time steps (of ${u})`;
  const plural = count === "1" ? u : u.endsWith("s") ? u : `${u}s`;
  return `${count} ${plural}`;
}

function percent(change: number): string {
  const pct = Math.abs(change) * 100;
  return pct < 10 ? pct.toFixed(1) : pct.toFixed(0);
}

function roundTime(t: number): string {
  return t < 10 ? t.toFixed(1) : t < 1000 ? t.toFixed(0) : t.toExponential(1);
}

export function lambdaVerdict(lambda: number, unit: string): Verdict {
  if (!(lambda > 0) || !Number.isFinite(lambda)) {
    return { trend: "dying-out", headline: "dying out", detail: "λ = 0: no individual ever leads back to its own stage, so every cohort disappears." };
  }
  const change = lambda - 1;
  if (Math.abs(change) < STABLE) {
    return { trend: "stable", headline: "stable", detail: `Numbers change by less than 0.05 % ${perStep(unit)} in the long run.` };
  }
  const trend: Trend = change > 0 ? "growing" : "declining";
  const t = Math.log(2) / Math.abs(Math.log(lambda));
  return {
    trend,
    headline: `${trend} about ${percent(change)} % ${perStep(unit)}`,
    detail: `At this rate numbers ${trend === "growing" ? "double" : "halve"} about every ${steps(roundTime(t), unit)}.`,
  };
}

/** What the census timing means for the numbers, in one sentence. */
export function censusNote(census: "pre-breeding" | "post-breeding"): string {
  return census === "pre-breeding"
    ? "Pre-breeding census: individuals are counted just before breeding, so reproduction arrows include the offspring's survival to their first census."
    : "Post-breeding census: individuals are counted just after breeding, so reproduction arrows include the parent's survival to the next breeding season.";
}
