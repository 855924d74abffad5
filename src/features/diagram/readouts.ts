/** Numbers a stage shows after analysis, with sensible precision. */

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
