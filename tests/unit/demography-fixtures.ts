// Shared test data for the numeric core: a seeded generator, random
// primitive matrices, and the published matrices of METHODS.md §1 with their
// sources. Each test file names the source again beside every check.
import { expect } from "vitest";

/** Seeded uniform [0, 1) generator (mulberry32), shared with the benchmarks: every random test is reproducible. */
export { seededRandom as seeded } from "../../bench/matrices";

/**
 * A random non-negative primitive matrix: a loop through every stage
 * (irreducible) plus a positive stasis entry (primitive), and other entries
 * positive with probability `density`; a few "fertilities" up to `maxFertility`.
 */
export function randomPrimitive(n: number, rand: () => number, options?: { density?: number; maxFertility?: number }): number[][] {
  const density = options?.density ?? 0.5;
  const maxF = options?.maxFertility ?? 10;
  const A = Array.from({ length: n }, () => Array.from({ length: n }, () => (rand() < density ? (rand() < 0.1 ? maxF * rand() : rand() / Math.max(1, n / 4)) : 0)));
  for (let i = 0; i < n; i++) (A[(i + 1) % n] as number[])[i] = 0.05 + 0.6 * rand();
  (A[0] as number[])[0] = 0.05 + 0.5 * rand();
  return A;
}

/** Row-major matrix–vector product on plain arrays (tests only). */
export function mul(A: readonly (readonly number[])[], x: readonly number[]): number[] {
  return A.map((row) => row.reduce((s, a, j) => s + a * (x[j] as number), 0));
}

/** xᵀA on plain arrays. */
export function leftMul(x: readonly number[], A: readonly (readonly number[])[]): number[] {
  const n = A.length;
  const out = new Array<number>(n).fill(0);
  A.forEach((row, i) => row.forEach((a, j) => (out[j] = (out[j] as number) + (x[i] as number) * a)));
  return out;
}

/** max_i |x_i − y_i| / max_i |y_i|: the norm-wise (∞-norm) relative error of x against reference y. */
export function relErr(x: readonly number[], y: readonly number[]): number {
  let num = 0;
  let den = 0;
  y.forEach((yi, i) => {
    num = Math.max(num, Math.abs((x[i] as number) - yi));
    den = Math.max(den, Math.abs(yi));
  });
  return num / den;
}

/** Assert that `actual` rounds to the printed value `printed` given to `decimals` decimal places (half a unit in the last place). */
export function expectPrinted(actual: number, printed: number, decimals: number): void {
  expect(Math.abs(actual - printed)).toBeLessThanOrEqual(0.5 * 10 ** -decimals + 1e-12);
}

export const TEASEL = {
  // Werner & Caswell 1977, as analysed in Caswell 2001 (METHODS.md §1); a53 = 0.038.
  stages: ["dormant seed 1", "dormant seed 2", "small rosette", "medium rosette", "large rosette", "flowering plant"],
  A: [
    [0, 0, 0, 0, 0, 322.38],
    [0.966, 0, 0, 0, 0, 0],
    [0.013, 0.01, 0.125, 0, 0, 3.448],
    [0.007, 0, 0.125, 0.238, 0, 30.17],
    [0.008, 0, 0.038, 0.245, 0.167, 0.862],
    [0, 0, 0, 0.023, 0.75, 0],
  ],
};

export const KILLER_WHALE = {
  // Brault & Caswell 1993, Ecology 74:1444–1454 (METHODS.md §1); F = row 1.
  stages: ["yearling", "juvenile", "mature female", "post-reproductive female"],
  A: [
    [0, 0.0043, 0.1132, 0],
    [0.9775, 0.9111, 0, 0],
    [0, 0.0736, 0.9534, 0],
    [0, 0, 0.0452, 0.9804],
  ],
};

export const LOGGERHEAD = {
  // Crouse, Crowder & Caswell 1987, Ecology 68:1412–1423 (METHODS.md §1); F = row 1.
  stages: ["eggs/hatchlings", "small juveniles", "large juveniles", "subadults", "novice breeders", "first-year remigrants", "mature breeders"],
  A: [
    [0, 0, 0, 0, 127, 4, 80],
    [0.6747, 0.737, 0, 0, 0, 0, 0],
    [0, 0.0486, 0.661, 0, 0, 0, 0],
    [0, 0, 0.0147, 0.6907, 0, 0, 0],
    [0, 0, 0, 0.0518, 0, 0, 0],
    [0, 0, 0, 0, 0.8091, 0, 0],
    [0, 0, 0, 0, 0, 0.8091, 0.8089],
  ],
};

/** Split a matrix whose first row is all reproduction (F = row 1) into U and F. */
export function splitFirstRow(A: readonly (readonly number[])[]): { U: number[][]; F: number[][] } {
  const U = A.map((row, i) => row.map((a) => (i === 0 ? 0 : a)));
  const F = A.map((row, i) => row.map((a) => (i === 0 ? a : 0)));
  return { U, F };
}

// A Leslie life table with exact answers (METHODS.md §1, [derived]):
// l(1)=0.5, l(2)=0.3, l(3)=0.1; m(1)=1, m(2)=3, m(3)=4.
export const LESLIE_PRE = {
  A: [
    [0.5, 1.5, 2.0],
    [0.6, 0, 0],
    [0, 1 / 3, 0],
  ],
  U: [
    [0, 0, 0],
    [0.6, 0, 0],
    [0, 1 / 3, 0],
  ],
  F: [
    [0.5, 1.5, 2.0],
    [0, 0, 0],
    [0, 0, 0],
  ],
};
export const LESLIE_POST = {
  A: [
    [0.5, 1.8, 4 / 3],
    [0.5, 0, 0],
    [0, 0.6, 0],
  ],
  U: [
    [0, 0, 0],
    [0.5, 0, 0],
    [0, 0.6, 0],
  ],
  F: [
    [0.5, 1.8, 4 / 3],
    [0, 0, 0],
    [0, 0, 0],
  ],
};
/** l(x)·m(x) for x = 1, 2, 3 of the life table above. */
export const NET_MATERNITY = [0.5 * 1, 0.3 * 3, 0.1 * 4];
