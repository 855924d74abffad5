/**
 * Two-column CSV files for the Climate area: measurements (temperature °C,
 * rate value) and temperature series (year, temperature °C). Comma,
 * semicolon or tab delimited; an optional header row (recognised when its
 * cells are not numbers); blank lines skipped. Every problem names its line
 * and column; nothing is guessed from a malformed cell.
 */
export interface PairsIssue {
  line: number;
  column?: number;
  message: string;
}

export type PairsResult = { ok: true; header: [string, string] | null; x: number[]; y: number[] } | { ok: false; issues: PairsIssue[] };

export const MAX_CSV_ROWS = 5000;
const MAX_ISSUES = 20;

const NUMBER = /^[-+]?(\d+\.?\d*|\.\d+)([eE][-+]?\d+)?$/;

function parseCell(cell: string): number | null {
  const t = cell.trim().replace(/^"(.*)"$/, "$1").trim();
  return NUMBER.test(t) ? Number(t) : null;
}

/** Reads two numeric columns; `names` label them in messages, e.g. ["temperature", "value"]. */
export function parseNumericPairs(text: string, names: [string, string]): PairsResult {
  const lines = text.replace(/^\uFEFF/, "").split(/\r\n|\n|\r/);
  const first = lines.find((l) => l.trim() !== "") ?? "";
  const delimiter = first.includes("\t") ? "\t" : first.includes(";") ? ";" : ",";
  const issues: PairsIssue[] = [];
  const x: number[] = [];
  const y: number[] = [];
  let header: [string, string] | null = null;
  let seenRow = false;
  lines.forEach((raw, index) => {
    if (issues.length >= MAX_ISSUES) return;
    const line = index + 1;
    if (raw.trim() === "") return;
    const cells = raw.split(delimiter).map((c) => c.trim());
    if (!seenRow) {
      seenRow = true;
      if (cells.every((c) => parseCell(c) === null)) {
        header = [cells[0] ?? "", cells[1] ?? ""];
        if (cells.length !== 2) issues.push({ line, message: `The header has ${cells.length} columns; expected 2 (${names[0]}, ${names[1]}).` });
        return;
      }
    }
    if (cells.length !== 2) {
      issues.push({ line, message: `Line ${line} has ${cells.length} columns; expected 2 (${names[0]}, ${names[1]}).` });
      return;
    }
    const a = parseCell(cells[0]!);
    const b = parseCell(cells[1]!);
    if (a === null) issues.push({ line, column: 1, message: `Line ${line}, column 1 (${names[0]}): "${cells[0]}" is not a number.` });
    if (b === null) issues.push({ line, column: 2, message: `Line ${line}, column 2 (${names[1]}): "${cells[1]}" is not a number.` });
    if (a !== null && b !== null) {
      x.push(a);
      y.push(b);
    }
  });
  if (issues.length) return { ok: false, issues };
  if (x.length > MAX_CSV_ROWS) return { ok: false, issues: [{ line: 1, message: `The file has ${x.length} rows; at most ${MAX_CSV_ROWS} are read.` }] };
  if (x.length === 0) return { ok: false, issues: [{ line: 1, message: `The file has no rows of numbers (${names[0]}, ${names[1]}).` }] };
  return { ok: true, header, x, y };
}
