/**
 * Words and numbers of the Risk tab: probabilities as percentages with as
 * many decimals as they need, time in the life cycle's own unit, and a
 * one-line summary of a Run's settings for the list of Runs.
 */
import type { LifeCycle } from "../../../shared/lifecycle";
import { formatNumber } from "../../lib/number-format";

/** 0 → "0 %", 0.0004 → "0.04 %", 0.000077 → "0.0077 %", 0.1234 → "12.3 %", 1 → "100 %". */
export function formatProbability(p: number | null | undefined): string {
  if (p === null || p === undefined || Number.isNaN(p)) return "—";
  if (p <= 0) return "0 %";
  if (p >= 1) return "100 %";
  if (p < 0.0001) return `${formatNumber(p * 100, 2)} %`;
  if (p < 0.01) return `${(p * 100).toFixed(2)} %`;
  if (p > 0.999) return `${(p * 100).toFixed(2)} %`;
  return `${(p * 100).toFixed(1)} %`;
}

/** A round probability as the rules state it: 0.5 → "50 %". */
export function formatShare(p: number): string {
  return `${formatNumber(p * 100, 3)} %`;
}

/** "3.1 % – 5.2 %": a 95 % interval of two probabilities. */
export function formatProbabilityRange(lower: number, upper: number): string {
  return `${formatProbability(lower)} – ${formatProbability(upper)}`;
}

/** "1 year", "25.5 years", "3 months". */
export function timeSpan(count: number, unit: string): string {
  const plural = count === 1 ? unit : pluralOf(unit);
  return `${formatNumber(count, 4)} ${plural}`;
}

/** "year" → "years"; units that already end in s are kept. */
export function pluralOf(unit: string): string {
  return unit.endsWith("s") ? unit : `${unit}s`;
}

/** Whole individuals as people read them: 1234 → "1,234"; fractions to 3 significant digits. */
export function formatCount(x: number | null | undefined): string {
  if (x === null || x === undefined || !Number.isFinite(x)) return formatNumber(x ?? null);
  if (Math.abs(x) >= 1e6) return formatNumber(x, 3);
  if (Number.isInteger(x)) return x.toLocaleString("en");
  return formatNumber(x, 3);
}

const ENVIRONMENT_WORDS: Record<string, string> = {
  "vital-rates": "vital rates vary",
  matrices: "life cycles drawn at random",
  markov: "Markov chain of life cycles",
};

/**
 * "Vital rates vary (s_a, f) · 100 years · 1,000 replicates · quasi-extinct
 * at ≤ 10": a Run's settings in one line. The settings come from the server
 * as stored; anything unexpected is left out rather than guessed.
 */
export function summariseSettings(settings: unknown, doc: LifeCycle): string {
  if (typeof settings !== "object" || settings === null) return "";
  const s = settings as Record<string, unknown>;
  const parts: string[] = [];
  const env = s.environment as Record<string, unknown> | undefined;
  if (env && typeof env.kind === "string") {
    let words = ENVIRONMENT_WORDS[env.kind] ?? env.kind;
    if (env.kind === "vital-rates" && Array.isArray(env.rates)) {
      const names = env.rates.map((r: { rateId?: string }) => doc.rates.find((x) => x.id === r.rateId)?.name ?? r.rateId ?? "?");
      words += ` (${names.slice(0, 4).join(", ")}${names.length > 4 ? `, +${names.length - 4}` : ""})`;
    } else if (Array.isArray(env.lifeCycleIds)) {
      words += ` (${env.lifeCycleIds.length})`;
    }
    parts.push(words.charAt(0).toUpperCase() + words.slice(1));
  }
  const unit = doc.timeStepUnit;
  if (typeof s.horizon === "number") parts.push(timeSpan(s.horizon, unit));
  if (typeof s.replicates === "number") parts.push(`${s.replicates.toLocaleString("en")} replicates`);
  const threshold = s.threshold as { value?: unknown; stages?: unknown } | undefined;
  if (threshold && typeof threshold.value === "number") {
    parts.push(`quasi-extinct at ≤ ${formatCount(threshold.value)}${Array.isArray(threshold.stages) ? ` in ${threshold.stages.length} chosen stage${threshold.stages.length === 1 ? "" : "s"}` : ""}`);
  }
  if (s.demographic === true) parts.push("demographic stochasticity");
  if (typeof s.ceiling === "number") parts.push(`ceiling ${formatCount(s.ceiling)}`);
  if (typeof s.scenarioId === "string") {
    const scenario = doc.scenarios?.find((x) => x.id === s.scenarioId);
    parts.unshift(`Levers scenario “${scenario?.name ?? "no longer in the life cycle"}”`);
  }
  return parts.join(" · ");
}
