// Structural checks on user input. Problems that make a matrix impossible to
// analyse at all (not an array, empty, ragged, non-square, too large, NaN or
// ±Infinity) throw a MatrixInputError naming the field and the position;
// sound-but-odd matrices (reducible, imprimitive, zero…) are not errors here —
// diagnostics.ts explains them.

/** Largest number of stages the core accepts. */
export const MAX_STAGES = 500;
/** Largest number of projection steps the core accepts. */
export const MAX_PROJECTION_STEPS = 10_000;

/**
 * Invalid input. `field` names the input ("A", "U", "F", "initial",
 * "stageNames", "projectionSteps"); `path` locates the problem with 0-based
 * array indices (e.g. ["A", 1, 2] is row 2, column 3 — messages count from 1,
 * as a biologist reads a_ij).
 */
export class MatrixInputError extends Error {
  override readonly name = "MatrixInputError";
  readonly field: string;
  readonly path: readonly (string | number)[];
  constructor(message: string, field: string, path: readonly (string | number)[] = [field]) {
    super(message);
    this.field = field;
    this.path = path;
  }
}

/** "1 entry", "3 entries". */
function count(k: number, one: string, many: string): string {
  return `${k} ${k === 1 ? one : many}`;
}

/** Words for a value that is not a finite number. */
function describe(x: unknown): string {
  if (typeof x === "number") return Number.isNaN(x) ? "NaN" : x > 0 ? "Infinity" : "-Infinity";
  if (x === null) return "null";
  return `not a number (${typeof x})`;
}

/**
 * Check that `value` is a square matrix of finite numbers (of size `size` when
 * given) and return it as a row-major Float64Array.
 */
export function readSquareMatrix(
  value: unknown,
  field: string,
  size?: number,
  options?: { allowNonFinite?: boolean },
): { n: number; data: Float64Array; nonFinite: [number, number][] } {
  if (!Array.isArray(value)) throw new MatrixInputError(`${field} must be an array of rows (a square matrix).`, field);
  const rows = value as unknown[];
  const n = rows.length;
  if (n === 0) throw new MatrixInputError(`${field} is empty: a projection matrix needs at least one stage.`, field);
  if (size === undefined && n > MAX_STAGES) {
    throw new MatrixInputError(`${field} has ${n} stages; at most ${MAX_STAGES} are supported.`, field);
  }
  const first = rows[0];
  if (!Array.isArray(first)) throw new MatrixInputError(`${field} row 1 is not an array of numbers.`, field, [field, 0]);
  const cols = first.length;
  for (let i = 1; i < n; i++) {
    const row = rows[i];
    if (!Array.isArray(row)) throw new MatrixInputError(`${field} row ${i + 1} is not an array of numbers.`, field, [field, i]);
    if (row.length !== cols) {
      throw new MatrixInputError(
        `${field} row ${i + 1} has ${count(row.length, "entry", "entries")} but row 1 has ${cols}: every row must have the same length.`,
        field,
        [field, i],
      );
    }
  }
  if (cols !== n) throw new MatrixInputError(`${field} is not square: it has ${count(n, "row", "rows")} of ${count(cols, "entry", "entries")}.`, field);
  if (size !== undefined && n !== size) {
    throw new MatrixInputError(`${field} must be ${size} × ${size} like A, but it is ${n} × ${n}.`, field);
  }
  const data = new Float64Array(n * n);
  const nonFinite: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    const row = rows[i] as unknown[];
    for (let j = 0; j < n; j++) {
      const x = row[j];
      if (typeof x !== "number" || !Number.isFinite(x)) {
        if (options?.allowNonFinite) {
          nonFinite.push([i, j]);
          data[i * n + j] = NaN;
          continue;
        }
        throw new MatrixInputError(
          `${field} row ${i + 1}, column ${j + 1} is ${describe(x)}; every entry must be a finite number.`,
          field,
          [field, i, j],
        );
      }
      data[i * n + j] = x;
    }
  }
  return { n, data, nonFinite };
}

/** Check stage names: n non-blank strings; defaults to "stage 1", "stage 2", … */
export function readStageNames(value: unknown, n: number): string[] {
  if (value === undefined) return Array.from({ length: n }, (_, i) => `stage ${i + 1}`);
  if (!Array.isArray(value)) throw new MatrixInputError("stageNames must be an array of strings.", "stageNames");
  if (value.length !== n) {
    throw new MatrixInputError(`stageNames has ${count(value.length, "name", "names")} but A has ${count(n, "stage", "stages")}.`, "stageNames");
  }
  return value.map((name: unknown, i) => {
    if (typeof name !== "string" || name.trim() === "") {
      throw new MatrixInputError(`stageNames entry ${i + 1} must be a non-empty string.`, "stageNames", ["stageNames", i]);
    }
    return name.trim();
  });
}

/** Check an initial population vector: n finite, non-negative numbers, not all zero. */
export function readPopulationVector(value: unknown, n: number, field = "initial"): Float64Array {
  if (!Array.isArray(value)) throw new MatrixInputError(`${field} must be an array of ${n} numbers (one per stage).`, field);
  if (value.length !== n) throw new MatrixInputError(`${field} has ${count(value.length, "entry", "entries")} but A has ${count(n, "stage", "stages")}.`, field);
  const out = new Float64Array(n);
  let total = 0;
  for (let i = 0; i < n; i++) {
    const x: unknown = value[i];
    if (typeof x !== "number" || !Number.isFinite(x)) {
      throw new MatrixInputError(`${field} entry ${i + 1} is ${describe(x)}; every entry must be a finite number.`, field, [field, i]);
    }
    if (x < 0) throw new MatrixInputError(`${field} entry ${i + 1} is negative (${x}); numbers of individuals cannot be negative.`, field, [field, i]);
    out[i] = x;
    total += x;
  }
  if (!(total > 0)) throw new MatrixInputError(`${field} is all zeros: the initial population needs at least one individual.`, field);
  return out;
}

/** Check a step count: a whole number from 1 to `max`. */
export function readStepCount(value: unknown, field: string, max: number): number {
  if (typeof value !== "number" || !Number.isInteger(value) || value < 1 || value > max) {
    throw new MatrixInputError(`${field} must be a whole number from 1 to ${max}.`, field);
  }
  return value;
}
