/**
 * An arrow's rate as typed: a number ≥ 0, or a formula of the life cycle's
 * vital rates, checked as the person types with the same checker the server
 * uses (shared/lifecycle/formula.ts).
 */
import { checkFormula, type FormulaError, type LifeCycle, type Transition } from "../../../shared/lifecycle";

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

export type RateReading =
  | { ok: true; rate: number | string; as: "number" | "formula" }
  | { ok: false; message: string; /** Vital rates the formula names that do not exist yet. */ unknownRates: string[] };

/** The text field's content for a stored rate. */
export function rateToText(rate: Transition["rate"]): string {
  return typeof rate === "number" ? String(rate) : rate;
}

export function readRate(text: string, document: LifeCycle): RateReading {
  const trimmed = text.trim();
  if (trimmed === "") return { ok: false, message: "Give a rate: a number such as 0.45, or a formula such as s_j * (1 - g_j).", unknownRates: [] };
  if (NUMBER.test(trimmed)) {
    const value = Number(trimmed);
    if (!Number.isFinite(value)) return { ok: false, message: "That number is too large.", unknownRates: [] };
    if (value < 0) return { ok: false, message: "A rate cannot be negative.", unknownRates: [] };
    return { ok: true, rate: value, as: "number" };
  }
  const check = checkFormula(trimmed, document.rates.map((r) => r.name));
  if (check.ok) return { ok: true, rate: trimmed, as: "formula" };
  const errors: readonly FormulaError[] = check.errors;
  const unknownRates = errors.every((e) => e.code === "unknown-rate") ? errors.map((e) => e.name).filter((n): n is string => n !== undefined) : [];
  return { ok: false, message: errors.map((e) => e.message).join(" "), unknownRates };
}

export { rateLabel } from "../../../shared/diagram/labels";
