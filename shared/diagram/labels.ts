/** Labels the diagram shows, on screen and in the report: arrow rates and stage readouts. */
import type { Transition } from "../lifecycle";

/** A short label for the arrow: the number in up to 4 significant digits, or the formula (shortened). */
export function rateLabel(rate: Transition["rate"], maxLength = 22): string {
  if (typeof rate === "number") {
    if (rate === 0) return "0";
    const abs = Math.abs(rate);
    return abs >= 1e-3 && abs < 1e5 ? String(Number(rate.toPrecision(4))) : rate.toExponential(2);
  }
  return rate.length > maxLength ? `${rate.slice(0, maxLength - 1)}…` : rate;
}

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
