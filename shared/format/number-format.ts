/**
 * Numbers for people: sensible precision, λ to 4 decimals, and uncertainty
 * beside a value where it is known. Display only; exports write full
 * precision.
 */

const SUPERSCRIPT: Record<string, string> = { "-": "⁻", "0": "⁰", "1": "¹", "2": "²", "3": "³", "4": "⁴", "5": "⁵", "6": "⁶", "7": "⁷", "8": "⁸", "9": "⁹" };

/** `digits` significant digits, trailing zeros dropped; very large or small values as a × 10ⁿ. Missing values as "—". */
export function formatNumber(value: number | null | undefined, digits = 4): string {
  if (value === null || value === undefined || Number.isNaN(value)) return "—";
  if (!Number.isFinite(value)) return value > 0 ? "∞" : "−∞";
  if (value === 0) return "0";
  const abs = Math.abs(value);
  const sign = value < 0 ? "−" : "";
  if (abs >= 1e6 || abs < 1e-4) {
    const [mantissa, exponent] = abs.toExponential(digits - 1).split("e") as [string, string];
    const m = mantissa.includes(".") ? mantissa.replace(/\.?0+$/, "") : mantissa;
    const e = String(Number(exponent)).replace(/./g, (c) => SUPERSCRIPT[c] ?? c);
    return `${sign}${m} × 10${e}`;
  }
  const fixed = Number(abs.toPrecision(digits));
  // Thousands stay readable without a separator that some locales read as a decimal point.
  return `${sign}${String(fixed)}`;
}

/** λ to 4 decimals, as the trade reports it. */
export function formatLambda(value: number): string {
  return value.toFixed(4);
}

/** A proportion as a percentage with one decimal: 0.0553 → "5.5 %". */
export function formatPercent(proportion: number, decimals = 1): string {
  return `${(proportion * 100).toFixed(decimals)} %`;
}

export interface Uncertainty {
  se?: number | undefined;
  ci?: { lower: number; upper: number; level: number } | undefined;
}

/** "0.4 ± 0.05 SE", "0.4 (95 % CI 0.32–0.48)", or the value alone. */
export function formatWithUncertainty(value: number, { se, ci }: Uncertainty, digits = 4): string {
  let text = formatNumber(value, digits);
  if (se !== undefined) text += ` ± ${formatNumber(se, 2)} SE`;
  if (ci !== undefined) text += ` (${formatNumber(ci.level * 100, 3)} % CI ${formatNumber(ci.lower, digits)}–${formatNumber(ci.upper, digits)})`;
  return text;
}
