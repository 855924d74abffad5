/**
 * CSV and JSON downloads of a life cycle and its results.
 *
 * Spreadsheets run a cell that begins with =, +, -, @, a tab or a carriage
 * return as a formula, so a stage named "=HYPERLINK(…)" could act when the
 * file is opened. Every text cell that begins with one of those characters is
 * written with a leading single quote, which spreadsheets show as text.
 * Numbers are written as numbers (a negative number stays -0.5, not '-0.5).
 */
import type { LifeCycle } from "../lifecycle";
import type { LifeCycleAnalysis } from "../schemas/life-cycles";

/** A CSV cell: text is escaped, numbers are written in shortest round-trip form, null is an empty cell. */
export type CsvCell = string | number | null;

const FORMULA_START = /^[=+\-@\t\r]/;

/** One cell as CSV text: formula-looking text prefixed with ', then quoted per RFC 4180 when needed. */
export function escapeCsvCell(cell: CsvCell): string {
  if (cell === null) return "";
  if (typeof cell === "number") {
    if (!Number.isFinite(cell)) return "";
    return String(Object.is(cell, -0) ? 0 : cell);
  }
  const text = FORMULA_START.test(cell) ? `'${cell}` : cell;
  return /[",\r\n]/.test(text) || text !== text.trim() ? `"${text.replaceAll('"', '""')}"` : text;
}

/** Rows of cells as CSV (comma-separated, CRLF line ends as RFC 4180 asks). */
export function toCsv(rows: readonly (readonly CsvCell[])[]): string {
  return rows.map((row) => row.map(escapeCsvCell).join(",")).join("\r\n") + "\r\n";
}

/** A square matrix with stage names on the header row (columns: from) and first column (rows: to). */
export function matrixRows(matrix: readonly (readonly number[])[], stageNames: readonly string[], corner = ""): CsvCell[][] {
  return [[corner, ...stageNames], ...matrix.map((row, i) => [stageNames[i] ?? "", ...row.map((v) => (Number.isFinite(v) ? v : null))])];
}

/** The projection matrix A as CSV; cells that cannot be computed are empty. */
export function matrixCsv(matrix: readonly (readonly number[])[], stageNames: readonly string[]): string {
  return toCsv(matrixRows(matrix, stageNames));
}

/**
 * The results as one CSV file in titled sections separated by blank rows:
 * summary numbers, w and v by stage, then S and E (row = to, column = from),
 * then the vital-rate sensitivities.
 */
export function resultsCsv(doc: LifeCycle, a: LifeCycleAnalysis): string {
  const names = a.stageNames;
  const lh = a.lifeHistory;
  const rows: CsvCell[][] = [
    ["Stagewright results", doc.name],
    ["Census", a.census],
    ["Time step", a.timeStepUnit],
    [],
    ["Quantity", "Value", "Unit"],
    ["lambda (dominant eigenvalue)", a.lambda, `growth factor per ${a.timeStepUnit}`],
    ["Damping ratio", a.dampingRatio, "dimensionless"],
    ["Period of oscillation", a.period, `${a.timeStepUnit}s`],
    [`Convergence time (to ${a.convergenceFactor} times closer to the stable structure)`, a.convergenceTime, `${a.timeStepUnit}s`],
    ["Net reproductive rate R0", lh?.netReproductiveRate ?? null, "offspring per individual per lifetime"],
    ["Generation time ln R0 / ln lambda", lh?.generationTimeR0 ?? null, `${a.timeStepUnit}s`],
    ["Generation time as mean age of parents", lh?.meanAgeOfParents ?? null, `${a.timeStepUnit}s`],
    [],
    ["Stage", "Stable stage distribution w (sums to 1)", a.reproductiveValueScaling ? `Reproductive value v (scaled so that v = 1 for ${names[a.reproductiveValueScaling.index] ?? "the first stage"})` : "Reproductive value v (not defined)", `Life expectancy (${a.timeStepUnit}s)`],
    ...names.map((name, i): CsvCell[] => [name, a.stableStage?.[i] ?? null, a.reproductiveValue?.[i] ?? null, lh?.lifeExpectancy[i] ?? null]),
  ];
  if (a.sensitivity) rows.push([], ["Sensitivity S = dlambda/da_ij (rows: stage at t+1, columns: stage at t)"], ...matrixRows(a.sensitivity, names, "to \\ from"));
  if (a.elasticity) rows.push([], ["Elasticity E = (a_ij/lambda) S_ij (rows: stage at t+1, columns: stage at t; sums to 1)"], ...matrixRows(a.elasticity, names, "to \\ from"));
  if (a.sensitivity) {
    rows.push([], ["Structural zeros (a_ij = 0: their sensitivities are not levers)"], ...matrixRows(a.structuralZero.map((r) => r.map((z) => (z ? 1 : 0))), names, "to \\ from"));
  }
  if (a.vitalRates.length > 0) {
    rows.push([], ["Vital rate", "Value", "Sensitivity dlambda/dx", "Elasticity (x/lambda) dlambda/dx"], ...a.vitalRates.map((r): CsvCell[] => [r.name, r.value, r.sensitivity, r.elasticity]));
  }
  return toCsv(rows);
}

/**
 * The life cycle as Stagewright's own JSON document (versioned by its
 * `stagewright` field). Importing the file gives back exactly this document.
 */
export function lifeCycleJson(doc: LifeCycle): string {
  return `${JSON.stringify(doc, null, 2)}\n`;
}

/** A file name from the life cycle's name: letters, digits and dashes. */
export function fileStem(name: string): string {
  const stem = name
    .normalize("NFKD")
    .replace(/[\u0300-\u036f]/g, "")
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, "-")
    .replace(/^-+|-+$/g, "")
    .slice(0, 60);
  return stem === "" ? "life-cycle" : stem;
}
