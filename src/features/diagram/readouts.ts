/** Numbers a stage shows after analysis, with sensible precision, and what a stale one says. */

/** Stable-stage share as a percentage with one decimal ("42.1 %"). */
export function formatShare(share: number | null): string {
  return share === null ? "—" : `${(share * 100).toFixed(1)} %`;
}

/** Reproductive value to 3 significant digits. */
export function formatValue(value: number | null): string {
  if (value === null) return "—";
  if (value === 0) return "0";
  return Math.abs(value) >= 1e-3 && Math.abs(value) < 1e5 ? String(Number(value.toPrecision(3))) : value.toExponential(2);
}

/** An elasticity to 3 decimals. */
export function formatElasticity(e: number): string {
  return e.toFixed(3);
}

export type StaleReason = "updating" | "out-of-date";

/** Why a number is stale: a newer result is on its way, or the current document cannot be analysed. */
export function staleReason(analysis: { pending: boolean; error: unknown }): StaleReason {
  return analysis.error && !analysis.pending ? "out-of-date" : "updating";
}

export const STALE_SHORT: Record<StaleReason, string> = { updating: "updating…", "out-of-date": "out of date" };
export const STALE_LONG: Record<StaleReason, string> = {
  updating: "updating…",
  "out-of-date": "out of date, because the current life cycle cannot be analysed",
};
