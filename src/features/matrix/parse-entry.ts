const NUMBER = /^[+]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A matrix entry as typed: empty means 0; a number ≥ 0 (decimal comma accepted); null for anything else. */
export function parseEntry(text: string): number | null {
  const t = text.trim().replace(/^(\d+),(\d+)$/, "$1.$2");
  if (t === "") return 0;
  if (!NUMBER.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}
