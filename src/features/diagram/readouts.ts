/** Numbers a stage shows after analysis, with sensible precision, and what a stale one says. */

export { formatShare, formatValue } from "../../../shared/diagram/labels";

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
