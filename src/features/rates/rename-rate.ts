/**
 * Renaming a vital rate and rewriting every formula that uses it.
 *
 * Formulas are rewritten token by token, never by text search, so renaming
 * `s_j` leaves `s_j2`, `xs_j` and the digits of `1e5` alone, and only whole
 * identifiers equal to the old name change. Spacing and everything else in
 * the formula stay exactly as the person typed them.
 */
import type { LifeCycle } from "../../../shared/lifecycle";

// The same lexical classes the formula checker uses: quoted text, numbers
// (with exponents, so the "e5" of 1e5 is never an identifier), identifiers,
// and single other characters.
const TOKEN = /("(?:[^"\\]|\\.)*"?|'(?:[^'\\]|\\.)*'?)|((?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?)|([\p{L}_$][\p{L}\p{N}_$]*)|([\s\S])/uy;

/** The formula with every identifier `from` replaced by `to`. */
export function renameInFormula(formula: string, from: string, to: string): string {
  if (from === to) return formula;
  let out = "";
  TOKEN.lastIndex = 0;
  let m: RegExpExecArray | null;
  while (TOKEN.lastIndex < formula.length && (m = TOKEN.exec(formula)) !== null) {
    const identifier = m[3];
    out += identifier !== undefined && identifier === from ? to : m[0];
  }
  return out;
}

/** Whether the formula uses the identifier `name` (as a whole token). */
export function formulaMentions(formula: string, name: string): boolean {
  TOKEN.lastIndex = 0;
  let m: RegExpExecArray | null;
  while (TOKEN.lastIndex < formula.length && (m = TOKEN.exec(formula)) !== null) {
    if (m[3] === name) return true;
  }
  return false;
}

export interface RateRename {
  document: LifeCycle;
  /** Ids of the arrows whose formula changed. */
  changedArrows: string[];
}

/**
 * Renames the vital rate `rateId` and rewrites the formulas that use it.
 * The caller checks the new name first (see `rateNameError`); an unknown id
 * leaves the document unchanged.
 */
export function renameRate(doc: LifeCycle, rateId: string, newName: string): RateRename {
  const rate = doc.rates.find((r) => r.id === rateId);
  if (rate === undefined || rate.name === newName) return { document: doc, changedArrows: [] };
  const oldName = rate.name;
  const changedArrows: string[] = [];
  const transitions = doc.transitions.map((t) => {
    if (typeof t.rate !== "string") return t;
    const next = renameInFormula(t.rate, oldName, newName);
    if (next === t.rate) return t;
    changedArrows.push(t.id);
    return { ...t, rate: next };
  });
  return {
    document: { ...doc, rates: doc.rates.map((r) => (r.id === rateId ? { ...r, name: newName } : r)), transitions },
    changedArrows,
  };
}

/** A number as formula text: negative values in parentheses, so `2 * -0.5` never happens. */
function numberLiteral(value: number): string {
  const text = String(value);
  return value < 0 ? `(${text})` : text;
}

/**
 * Removes the vital rate `rateId` and writes its value into every formula
 * that used it, so the arrows keep their values and the document stays valid.
 */
export function removeRateKeepingValues(doc: LifeCycle, rateId: string): RateRename {
  const rate = doc.rates.find((r) => r.id === rateId);
  if (rate === undefined) return { document: doc, changedArrows: [] };
  const literal = numberLiteral(rate.value);
  const changedArrows: string[] = [];
  const transitions = doc.transitions.map((t) => {
    if (typeof t.rate !== "string" || !formulaMentions(t.rate, rate.name)) return t;
    changedArrows.push(t.id);
    const formula = renameInFormula(t.rate, rate.name, literal);
    // A formula that was just the rate becomes a plain number.
    return { ...t, rate: formula.trim() === literal ? rate.value : formula };
  });
  const next: LifeCycle = { ...doc, rates: doc.rates.filter((r) => r.id !== rateId), transitions };
  // Its correlations go with it.
  if (doc.correlations) {
    const kept = doc.correlations.filter((c) => c.a !== rateId && c.b !== rateId);
    if (kept.length > 0) next.correlations = kept;
    else delete next.correlations;
  }
  return { document: next, changedArrows };
}
