const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;

/** A finite number typed as text ("0.25", "-1e-3", "1,5" with a decimal comma); null when it is not one. */
export function parseNumberInput(text: string): number | null {
  const t = text.trim().replace(/^([+-]?\d+),(\d+)$/, "$1.$2");
  if (!NUMBER.test(t)) return null;
  const v = Number(t);
  return Number.isFinite(v) ? v : null;
}
