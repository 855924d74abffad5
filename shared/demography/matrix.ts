// Dense square-matrix helpers on Float64Array, row-major: entry (i, j) sits at
// data[i * n + j]. The numeric core converts plain number[][] input once and
// works on these buffers so that hot loops stay monomorphic and allocation-free.

/** Machine epsilon for IEEE double precision (dimensionless). */
export const EPS = 2.220446049250313e-16;

/** Copy a square number[][] (rows of equal length n, already validated) into a row-major Float64Array. */
export function toDense(rows: readonly (readonly number[])[]): Float64Array {
  const n = rows.length;
  const out = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const row = rows[i] as readonly number[];
    const base = i * n;
    for (let j = 0; j < n; j++) out[base + j] = row[j] as number;
  }
  return out;
}

/** Copy a row-major n×n Float64Array back to plain number[][] rows. */
export function fromDense(a: Float64Array, n: number): number[][] {
  const out: number[][] = new Array<number[]>(n);
  for (let i = 0; i < n; i++) {
    const row = new Array<number>(n);
    const base = i * n;
    for (let j = 0; j < n; j++) row[j] = a[base + j] as number;
    out[i] = row;
  }
  return out;
}

/** Plain number[] copy of a Float64Array (JSON-serialisable output). */
export function toArray(x: Float64Array): number[] {
  const out = new Array<number>(x.length);
  for (let i = 0; i < x.length; i++) out[i] = x[i] as number;
  return out;
}

/** Transpose of a row-major n×n matrix into a new buffer. */
export function transpose(a: Float64Array, n: number): Float64Array {
  const t = new Float64Array(n * n);
  for (let i = 0; i < n; i++) {
    const base = i * n;
    for (let j = 0; j < n; j++) t[j * n + i] = a[base + j] as number;
  }
  return t;
}

/** y = A x for row-major n×n A (y must not alias x). */
export function matvec(a: Float64Array, n: number, x: Float64Array, y: Float64Array): void {
  // Four rows per pass share each load of x_j: about twice as fast as one
  // row at a time in V8, which has no SIMD for plain loops.
  let i = 0;
  for (; i + 3 < n; i += 4) {
    const b0 = i * n;
    const b1 = b0 + n;
    const b2 = b1 + n;
    const b3 = b2 + n;
    let s0 = 0;
    let s1 = 0;
    let s2 = 0;
    let s3 = 0;
    for (let j = 0; j < n; j++) {
      const xj = x[j] as number;
      s0 += (a[b0 + j] as number) * xj;
      s1 += (a[b1 + j] as number) * xj;
      s2 += (a[b2 + j] as number) * xj;
      s3 += (a[b3 + j] as number) * xj;
    }
    y[i] = s0;
    y[i + 1] = s1;
    y[i + 2] = s2;
    y[i + 3] = s3;
  }
  for (; i < n; i++) {
    const base = i * n;
    let s = 0;
    for (let j = 0; j < n; j++) s += (a[base + j] as number) * (x[j] as number);
    y[i] = s;
  }
}

/** yᵀ = xᵀ A for row-major n×n A (y must not alias x). */
export function vecmat(a: Float64Array, n: number, x: Float64Array, y: Float64Array): void {
  // Four rows per pass: each y_j is read and written once per four rows.
  y.fill(0);
  let i = 0;
  for (; i + 3 < n; i += 4) {
    const b0 = i * n;
    const b1 = b0 + n;
    const b2 = b1 + n;
    const b3 = b2 + n;
    const x0 = x[i] as number;
    const x1 = x[i + 1] as number;
    const x2 = x[i + 2] as number;
    const x3 = x[i + 3] as number;
    for (let j = 0; j < n; j++) {
      y[j] = (y[j] as number) + x0 * (a[b0 + j] as number) + x1 * (a[b1 + j] as number) + x2 * (a[b2 + j] as number) + x3 * (a[b3 + j] as number);
    }
  }
  for (; i < n; i++) {
    const xi = x[i] as number;
    const base = i * n;
    for (let j = 0; j < n; j++) y[j] = (y[j] as number) + xi * (a[base + j] as number);
  }
}

/** Dot product of the first `len` entries of x (from offset ox) and y (from offset oy). */
export function dotAt(x: Float64Array, ox: number, y: Float64Array, oy: number, len: number): number {
  let s0 = 0;
  let s1 = 0;
  let k = 0;
  for (; k + 1 < len; k += 2) {
    s0 += (x[ox + k] as number) * (y[oy + k] as number);
    s1 += (x[ox + k + 1] as number) * (y[oy + k + 1] as number);
  }
  if (k < len) s0 += (x[ox + k] as number) * (y[oy + k] as number);
  return s0 + s1;
}

/** Dot product of two equal-length vectors. */
export function dot(x: Float64Array, y: Float64Array): number {
  return dotAt(x, 0, y, 0, x.length);
}

/** Sum of entries. */
export function sum(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += x[i] as number;
  return s;
}

/** 1-norm Σ|x_i|. */
export function norm1(x: Float64Array): number {
  let s = 0;
  for (let i = 0; i < x.length; i++) s += Math.abs(x[i] as number);
  return s;
}

/** Euclidean norm, guarded against overflow by scaling with the largest entry. */
export function norm2(x: Float64Array): number {
  let scale = 0;
  for (let i = 0; i < x.length; i++) scale = Math.max(scale, Math.abs(x[i] as number));
  if (scale === 0) return 0;
  let s = 0;
  for (let i = 0; i < x.length; i++) {
    const t = (x[i] as number) / scale;
    s += t * t;
  }
  return scale * Math.sqrt(s);
}

/** Largest absolute entry. */
export function normInf(x: Float64Array): number {
  let m = 0;
  for (let i = 0; i < x.length; i++) m = Math.max(m, Math.abs(x[i] as number));
  return m;
}

/** Frobenius norm of a row-major n×n matrix. */
export function normFrobenius(a: Float64Array): number {
  return norm2(a);
}

/** Matrix 1-norm: the largest column sum of |a_ij|. */
export function matrixNorm1(a: Float64Array, n: number): number {
  const col = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const base = i * n;
    for (let j = 0; j < n; j++) col[j] = (col[j] as number) + Math.abs(a[base + j] as number);
  }
  return normInf(col);
}

/** Scale x in place by c. */
export function scale(x: Float64Array, c: number): void {
  for (let i = 0; i < x.length; i++) x[i] = (x[i] as number) * c;
}

/**
 * Deterministic pseudo-random numbers in [0, 1) (xorshift32). Used only for
 * Krylov start vectors, so that results are reproducible run to run.
 */
export function pseudoRandom(seed: number): () => number {
  let s = seed >>> 0 || 0x9e3779b9;
  return () => {
    s ^= s << 13;
    s >>>= 0;
    s ^= s >>> 17;
    s ^= s << 5;
    s >>>= 0;
    return s / 4294967296;
  };
}
