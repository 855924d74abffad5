/**
 * Projection matrices as plain CSV.
 *
 * Export writes a header row (an empty corner cell, then the stage names:
 * the columns, "from") and one row per stage (its name, then the row's
 * entries: "to"), comma-separated, numbers in shortest round-trip form.
 *
 * Import accepts comma, semicolon or tab delimiters; an optional header row
 * of stage names (recognised when its cells after the first are all
 * non-numbers, or its first cell is empty); an optional first column of
 * stage names (recognised when every row starts with a non-number, or the
 * header has an empty corner cell, which allows numeric names); RFC 4180 quoting;
 * a decimal comma when the delimiter is not a comma. Entries must be finite
 * numbers ≥ 0 and the matrix square.
 */
import { MAX_STAGES } from "./schema";

export type CsvDelimiter = "," | ";" | "\t";

/** A problem at a place in the CSV text; line and column are 1-based. */
export interface CsvIssue {
  line: number;
  /** The cell (field) number, counting the name column if there is one. */
  column?: number;
  message: string;
}

export type MatrixCsvResult =
  | {
      ok: true;
      matrix: number[][];
      /** From the header row or the name column; null when the file has neither. */
      stageNames: string[] | null;
      delimiter: CsvDelimiter;
      hasHeader: boolean;
      hasNameColumn: boolean;
    }
  | { ok: false; issues: CsvIssue[] };

const MAX_ISSUES = 50;

function quote(cell: string, delimiter: string): string {
  return cell.includes(delimiter) || /["\r\n]/.test(cell) || cell !== cell.trim() ? `"${cell.replaceAll('"', '""')}"` : cell;
}

/** The matrix as CSV with stage names on the header row and first column. */
export function matrixToCsv(A: readonly (readonly number[])[], stageNames: readonly string[], delimiter: CsvDelimiter = ","): string {
  const n = A.length;
  if (stageNames.length !== n) throw new RangeError(`Give ${n} stage names, one per row; got ${stageNames.length}.`);
  A.forEach((row, i) => {
    if (row.length !== n) throw new RangeError(`Row ${i + 1} has ${row.length} entries; the matrix has ${n} rows and must be square.`);
    row.forEach((v, j) => {
      if (!Number.isFinite(v)) throw new RangeError(`Entry (${i + 1}, ${j + 1}) is ${v}; only finite numbers can be exported.`);
    });
  });
  const lines = [["", ...stageNames].map((c) => quote(c, delimiter)).join(delimiter)];
  A.forEach((row, i) => lines.push([quote(stageNames[i]!, delimiter), ...row.map((v) => String(Object.is(v, -0) ? 0 : v))].join(delimiter)));
  return `${lines.join("\r\n")}\r\n`;
}

interface CsvRecord {
  line: number;
  cells: string[];
}

function detectDelimiter(text: string): CsvDelimiter {
  // Count delimiters outside quotes on the first non-empty line.
  let inQuotes = false;
  const counts = { ",": 0, ";": 0, "\t": 0 };
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (ch === '"') inQuotes = !inQuotes;
    else if (!inQuotes && (ch === "\n" || ch === "\r")) {
      if (counts[","] + counts[";"] + counts["\t"] > 0) break;
    } else if (!inQuotes && (ch === "," || ch === ";" || ch === "\t")) counts[ch]++;
  }
  if (counts["\t"] > 0) return "\t";
  if (counts[";"] > 0) return ";";
  return ",";
}

/** RFC 4180 records; blank lines are skipped. */
function readRecords(text: string, delimiter: CsvDelimiter, issues: CsvIssue[]): CsvRecord[] {
  const records: CsvRecord[] = [];
  let line = 1;
  let recordLine = 1;
  let cells: string[] = [];
  let cell = "";
  let i = 0;
  let quoted = false; // the current cell was quoted
  const endCell = () => {
    cells.push(quoted ? cell : cell.trim());
    cell = "";
    quoted = false;
  };
  const endRecord = () => {
    endCell();
    if (!(cells.length === 1 && cells[0] === "")) records.push({ line: recordLine, cells });
    cells = [];
  };
  while (i < text.length) {
    const ch = text[i]!;
    if (ch === '"' && cell.trim() === "" && !quoted) {
      // a quoted cell
      quoted = true;
      cell = "";
      const startLine = line;
      i++;
      for (;;) {
        if (i >= text.length) {
          issues.push({ line: startLine, column: cells.length + 1, message: "A quoted cell is never closed (missing \")." });
          return records;
        }
        const q = text[i]!;
        if (q === '"') {
          if (text[i + 1] === '"') {
            cell += '"';
            i += 2;
            continue;
          }
          i++;
          break;
        }
        if (q === "\n") line++;
        cell += q;
        i++;
      }
      // only spaces may follow the closing quote
      while (i < text.length && (text[i] === " " || (text[i] === "\t" && delimiter !== "\t"))) i++;
      const next = text[i];
      if (next !== undefined && next !== delimiter && next !== "\n" && next !== "\r") {
        issues.push({ line, column: cells.length + 1, message: "Unexpected text after a closing quote." });
        while (i < text.length && text[i] !== delimiter && text[i] !== "\n" && text[i] !== "\r") i++;
      }
      continue;
    }
    if (ch === delimiter) {
      endCell();
      i++;
    } else if (ch === "\r" || ch === "\n") {
      endRecord();
      i += ch === "\r" && text[i + 1] === "\n" ? 2 : 1;
      line++;
      recordLine = line;
    } else {
      cell += ch;
      i++;
    }
  }
  if (cell !== "" || cells.length > 0 || quoted) endRecord();
  return records;
}

const NUMBER = /^[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?$/;
const DECIMAL_COMMA = /^[+-]?\d+,\d+(?:[eE][+-]?\d+)?$/;

function toNumber(cell: string, delimiter: CsvDelimiter): number | null {
  if (NUMBER.test(cell)) return Number(cell);
  if (delimiter !== "," && DECIMAL_COMMA.test(cell)) return Number(cell.replace(",", "."));
  return null;
}

/**
 * Reads a square projection matrix from CSV text. On failure, lists the
 * problems (at most 50) with their line and column.
 */
export function parseMatrixCsv(text: string, options: { delimiter?: CsvDelimiter } = {}): MatrixCsvResult {
  const source = text.startsWith("\uFEFF") ? text.slice(1) : text;
  const delimiter = options.delimiter ?? detectDelimiter(source);
  const issues: CsvIssue[] = [];
  const records = readRecords(source, delimiter, issues);
  if (issues.length > 0) return { ok: false, issues };
  if (records.length === 0) return { ok: false, issues: [{ line: 1, message: "The file is empty: expected a square matrix of numbers." }] };

  const isNum = (c: string) => toNumber(c, delimiter) !== null;
  const first = records[0]!;
  // A header row has only non-numbers after its first cell, or an empty
  // corner cell (which allows numeric stage names). A single bad cell in the
  // first row is a bad cell, not a header.
  const rest = first.cells.slice(1);
  const hasHeader = (rest.length > 0 && rest.every((c) => c !== "" && !isNum(c))) || (first.cells.length > 1 && first.cells[0] === "");
  const header = hasHeader ? first : null;
  const data = hasHeader ? records.slice(1) : records;
  if (data.length === 0) return { ok: false, issues: [{ line: first.line, message: "The file has a header row but no matrix rows." }] };

  // Ragged rows are reported against the first data row.
  const width = data[0]!.cells.length;
  for (const r of data) {
    if (r.cells.length !== width) {
      issues.push({ line: r.line, message: `Line ${r.line} has ${r.cells.length} cells; line ${data[0]!.line} has ${width}. Every row needs the same number of cells.` });
      if (issues.length >= MAX_ISSUES) break;
    }
  }
  if (issues.length > 0) return { ok: false, issues };

  // A name column: every row starts with a non-number, or the header has an
  // empty corner cell above the first column.
  const hasNameColumn = data.every((r) => !isNum(r.cells[0]!)) || (header !== null && header.cells[0] === "" && header.cells.length === width);
  const n = hasNameColumn ? width - 1 : width;
  if (n === 0) return { ok: false, issues: [{ line: data[0]!.line, message: "The rows have names but no numbers." }] };
  if (n > MAX_STAGES) return { ok: false, issues: [{ line: data[0]!.line, message: `The matrix has ${n} columns; Stagewright takes at most ${MAX_STAGES} stages.` }] };

  let columnNames: string[] | null = null;
  if (header !== null) {
    const expected = hasNameColumn ? width : n;
    if (header.cells.length !== expected) {
      issues.push({
        line: header.line,
        message: `The header row has ${header.cells.length} cells; the matrix rows need ${expected}${hasNameColumn ? " (a corner cell, then one name per stage)" : " (one name per stage)"}.`,
      });
      return { ok: false, issues };
    }
    columnNames = hasNameColumn ? header.cells.slice(1) : header.cells;
    columnNames.forEach((name, k) => {
      if (name === "") issues.push({ line: header.line, column: k + 1 + (hasNameColumn ? 1 : 0), message: "A stage name in the header row is empty." });
    });
  }

  const matrix: number[][] = [];
  const rowNames: string[] = [];
  for (const r of data) {
    if (issues.length >= MAX_ISSUES) break;
    const offset = hasNameColumn ? 1 : 0;
    if (hasNameColumn) {
      const name = r.cells[0]!;
      if (name === "") issues.push({ line: r.line, column: 1, message: "The stage name in the first column is empty." });
      rowNames.push(name);
    }
    const row: number[] = [];
    for (let k = offset; k < r.cells.length; k++) {
      const cell = r.cells[k]!;
      const v = toNumber(cell, delimiter);
      if (cell === "") issues.push({ line: r.line, column: k + 1, message: "Empty cell: every matrix entry needs a number (write 0 for no transition)." });
      else if (v === null) issues.push({ line: r.line, column: k + 1, message: `"${cell}" is not a number.` });
      else if (!Number.isFinite(v)) issues.push({ line: r.line, column: k + 1, message: `"${cell}" is too large.` });
      else if (v < 0) issues.push({ line: r.line, column: k + 1, message: `${cell} is negative; matrix entries are rates ≥ 0.` });
      row.push(v ?? NaN);
      if (issues.length >= MAX_ISSUES) break;
    }
    matrix.push(row);
  }
  if (issues.length > 0) return { ok: false, issues: issues.slice(0, MAX_ISSUES) };

  if (matrix.length !== n) {
    return { ok: false, issues: [{ line: data[data.length - 1]!.line, message: `The matrix has ${matrix.length} rows and ${n} columns; a projection matrix is square.` }] };
  }
  if (columnNames !== null && hasNameColumn) {
    for (let k = 0; k < n; k++) {
      if (rowNames[k] !== columnNames[k]) {
        return {
          ok: false,
          issues: [{ line: data[k]!.line, column: 1, message: `Row ${k + 1} is named "${rowNames[k]}" but column ${k + 1} is "${columnNames[k]}"; rows and columns must list the stages in the same order.` }],
        };
      }
    }
  }
  const stageNames = columnNames ?? (hasNameColumn ? rowNames : null);
  return { ok: true, matrix, stageNames, delimiter, hasHeader, hasNameColumn };
}
