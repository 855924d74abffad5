// Arnoldi process with implicit restarts (Sorensen 1992, SIAM J. Matrix Anal.
// Appl. 13:357; Lehoucq & Sorensen 1996) for a few extreme eigenvalues of a
// large non-symmetric operator, using only products y = Op·x.
//
// A V_k = V_k H_k + f e_kᵀ with orthonormal V (rows of `basis`), H upper
// Hessenberg. Each restart applies the unwanted Ritz values as exact shifts
// to H, which filters them out of the start vector without new products.
// When the basis can span the whole space (m = n) the Arnoldi process is a
// reduction to Hessenberg form and H's eigenvalues are all of A's.
import { EPS, dotAt, pseudoRandom } from "./matrix";
import { hessenbergEigenvalues, hessenbergEigenvector, hessenbergEigenvectorTail, norm3 } from "./hessenberg";

/** y = Op·x. */
export type LinearOperator = (x: Float64Array, y: Float64Array) => void;

/** How Ritz values are ranked: by real part, or by modulus (ties: larger real part). */
export type RitzOrder = "real" | "modulus";

export interface KrylovOptions {
  /** Basis size (≤ n). */
  readonly m: number;
  /** How many leading Ritz values (in `order`) must converge. Widened so a conjugate pair is never split. */
  readonly wanted: number;
  readonly order: RitzOrder;
  /** Relative residual wanted for the leading Ritz value: |β·y_m| ≤ tolLeading·scale. */
  readonly tolLeading: number;
  /**
   * Absolute residual wanted for a wanted Ritz value (re, im) other than the
   * leading one (leadRe, leadIm).
   */
  readonly tolOthers: (re: number, im: number, leadRe: number, leadIm: number) => number;
  /** Budget of operator products before giving up. */
  readonly maxProducts: number;
  /** A norm of the operator (Frobenius is fine): floors the tolerance at what rounding allows. */
  readonly operatorNorm: number;
  /** Start vector (copied), or a pseudo-random positive vector from this seed. */
  readonly start?: Float64Array;
  readonly seed: number;
}

export interface KrylovResult {
  readonly m: number;
  /** Basis vectors as rows: basis[k * n + i]. */
  readonly basis: Float64Array;
  /** The m×m Hessenberg matrix of the final factorisation. */
  readonly h: Float64Array;
  /** Ritz values (eigenvalues of h), in `sorted` order. */
  readonly re: Float64Array;
  readonly im: Float64Array;
  /** Indices into re/im by decreasing rank under the chosen order. */
  readonly sorted: Int32Array;
  /** Residual estimate |β·y_m| of the wanted Ritz values by rank (rank < wantedCount). */
  readonly residual: Float64Array;
  readonly wantedCount: number;
  readonly leadingConverged: boolean;
  readonly converged: boolean;
  readonly products: number;
  readonly restarts: number;
  /** False when the small dense eigen-solve itself failed. */
  readonly solved: boolean;
}

/** Restarted Arnoldi for the leading Ritz values of Op (n-dimensional). */
export function restartedArnoldi(op: LinearOperator, n: number, options: KrylovOptions): KrylovResult {
  const m = Math.min(options.m, n);
  const basis = new Float64Array((m + 1) * n);
  const full = m === n; // the basis spans the space: one pass, no restarts
  let spare: Float64Array | null = null;
  const h = new Float64Array(m * m);
  const hCopy = new Float64Array(m * m);
  const work = new Float64Array(m * m);
  const coeffs = new Float64Array(m + 1);
  const w = new Float64Array(n);
  const y = new Float64Array(m);
  let q: Float64Array | null = null;
  const re = new Float64Array(m);
  const im = new Float64Array(m);
  const residual = new Float64Array(m);
  const rand = pseudoRandom(options.seed);
  const breakdown = Math.sqrt(n) * EPS * options.operatorNorm;
  const floor = 64 * EPS * options.operatorNorm;

  // First basis vector.
  if (options.start) basis.set(options.start.subarray(0, n));
  else for (let i = 0; i < n; i++) basis[i] = 0.5 + rand();
  normaliseRow(basis, 0, n);

  let k = 0; // current factorisation size
  let beta = 0;
  let products = 0;
  let restarts = 0;
  let sortedIdx: Int32Array = new Int32Array(m);
  let wantedCount = Math.min(options.wanted, m);
  let leadingConverged = false;
  let converged = false;
  let solved = true;

  for (;;) {
    // Extend the factorisation from k to m columns.
    for (let j = k; j < m; j++) {
      const vj = basis.subarray(j * n, (j + 1) * n);
      op(vj, w);
      products += 1;
      const wNorm = norm2Row(w, 0, n);
      // Classical Gram–Schmidt twice ("twice is enough") keeps V orthonormal to rounding.
      orthogonalise(basis, j + 1, n, w, coeffs);
      for (let i = 0; i <= j; i++) h[i * m + j] = coeffs[i] as number;
      orthogonalise(basis, j + 1, n, w, coeffs);
      for (let i = 0; i <= j; i++) h[i * m + j] = (h[i * m + j] as number) + (coeffs[i] as number);
      let b = norm2Row(w, 0, n);
      if (j + 1 === n) {
        // The basis already spans the space: nothing left to add.
        b = 0;
        w.fill(0);
      } else if (b <= breakdown || b <= 1e-14 * wNorm) {
        // The Krylov space is invariant: its Ritz values are exact
        // eigenvalues. Continue with a fresh random direction (and a zero in
        // H) so the remaining spectrum can still be found.
        b = 0;
        for (let i = 0; i < n; i++) w[i] = rand() - 0.5;
        orthogonalise(basis, j + 1, n, w, coeffs);
        orthogonalise(basis, j + 1, n, w, coeffs);
        const r = norm2Row(w, 0, n);
        if (r === 0) w.fill(0);
        else for (let i = 0; i < n; i++) w[i] = (w[i] as number) / r;
      } else {
        for (let i = 0; i < n; i++) w[i] = (w[i] as number) / b;
      }
      basis.set(w, (j + 1) * n);
      if (j + 1 < m) h[(j + 1) * m + j] = b;
      else beta = b;
    }

    // Ritz values.
    hCopy.set(h);
    if (!hessenbergEigenvalues(hCopy, m, re, im)) {
      solved = false;
      break;
    }
    sortedIdx = rankRitzValues(re, im, m, options.order);
    wantedCount = Math.min(m, widenForPairs(re, im, sortedIdx, options.wanted, m));

    // Residual estimates |β|·|y_m| for the wanted Ritz values.
    const lead = sortedIdx[0] as number;
    const scaleRef = Math.max(Math.hypot(re[lead] as number, im[lead] as number), 0);
    converged = true;
    leadingConverged = true;
    for (let r = 0; r < wantedCount; r++) {
      const idx = sortedIdx[r] as number;
      let tail: number;
      if (beta === 0 || full) tail = 0;
      else if (im[idx] === 0) {
        hessenbergEigenvector(h, m, re[idx] as number, y, work);
        tail = Math.abs(y[m - 1] as number);
      } else tail = hessenbergEigenvectorTail(h, m, re[idx] as number, im[idx] as number);
      residual[r] = Math.abs(beta) * tail;
      const tol = Math.max(
        r === 0 ? options.tolLeading * scaleRef : options.tolOthers(re[idx] as number, im[idx] as number, re[lead] as number, im[lead] as number),
        floor,
      );
      const ok = (residual[r] as number) <= tol;
      if (!ok) converged = false;
      if (r === 0 && !ok) leadingConverged = false;
    }
    if (converged || full || products >= options.maxProducts) break;
    spare ??= new Float64Array((m + 1) * n);
    q ??= new Float64Array(m * m);

    // Implicit restart: keep about half the basis (never splitting a
    // conjugate pair), use the other Ritz values as exact shifts.
    let keep = Math.max(wantedCount + 1, Math.floor(m / 2));
    if (keep > m - 1) keep = m - 1;
    if (keep < 1) break;
    const a = sortedIdx[keep - 1] as number;
    const bIdx = sortedIdx[keep] as number;
    if (im[a] !== 0 && im[bIdx] !== 0 && re[a] === re[bIdx] && im[a] === -(im[bIdx] as number)) {
      keep = keep + 1 <= m - 1 ? keep + 1 : keep - 1;
    }
    if (keep < 1) break;
    q.fill(0);
    for (let i = 0; i < m; i++) q[i * m + i] = 1;
    for (let r = keep; r < m; r++) {
      const idx = sortedIdx[r] as number;
      const sIm = im[idx] as number;
      if (sIm < 0 && r !== keep) continue; // second member of a pair already applied
      const sRe = re[idx] as number;
      applyShiftToBlocks(h, m, q, sRe, sIm);
      if (sIm !== 0 && r + 1 < m && im[sortedIdx[r + 1] as number] === -sIm) r += 1;
    }
    // New basis V⁺ = V Q (first keep+1 columns) and new residual vector.
    for (let c = 0; c <= keep; c++) {
      const out = c * n;
      spare.fill(0, out, out + n);
      for (let r = 0; r < m; r++) {
        const qrc = q[r * m + c] as number;
        if (qrc === 0) continue;
        const src = r * n;
        for (let i = 0; i < n; i++) spare[out + i] = (spare[out + i] as number) + qrc * (basis[src + i] as number);
      }
    }
    const hk = h[keep * m + keep - 1] as number;
    const qk = beta * (q[(m - 1) * m + keep - 1] as number);
    for (let i = 0; i < n; i++) w[i] = (spare[keep * n + i] as number) * hk + (basis[m * n + i] as number) * qk;
    basis.set(spare.subarray(0, keep * n));
    // Re-orthogonalise the new residual against the kept basis, for safety.
    orthogonalise(basis, keep, n, w, coeffs);
    for (let i = 0; i < keep; i++) h[i * m + keep - 1] = (h[i * m + keep - 1] as number) + (coeffs[i] as number);
    let fNorm = norm2Row(w, 0, n);
    if (fNorm <= breakdown) {
      fNorm = 0;
      for (let i = 0; i < n; i++) w[i] = rand() - 0.5;
      orthogonalise(basis, keep, n, w, coeffs);
      orthogonalise(basis, keep, n, w, coeffs);
      const r = norm2Row(w, 0, n);
      for (let i = 0; i < n; i++) w[i] = r === 0 ? 0 : (w[i] as number) / r;
    } else {
      for (let i = 0; i < n; i++) w[i] = (w[i] as number) / fNorm;
    }
    basis.set(w, keep * n);
    // Clear everything of H outside the kept leading block, then set the new coupling.
    for (let i = 0; i < m; i++) {
      for (let j = i < keep ? keep : 0; j < m; j++) h[i * m + j] = 0;
    }
    h[keep * m + keep - 1] = fNorm;
    for (let i = keep + 1; i < m; i++) for (let j = 0; j < keep; j++) h[i * m + j] = 0;
    k = keep;
    restarts += 1;
  }

  return {
    m,
    basis,
    h,
    re,
    im,
    sorted: sortedIdx,
    residual: residual.subarray(0, wantedCount),
    wantedCount,
    leadingConverged,
    converged,
    products,
    restarts,
    solved,
  };
}

/** Ritz vector x = V y for a real Ritz value of a finished run (‖x‖₂ ≈ 1). */
export function ritzVector(run: KrylovResult, n: number, theta: number): Float64Array {
  const { m, basis, h } = run;
  const y = new Float64Array(m);
  hessenbergEigenvector(h, m, theta, y, new Float64Array(m * m));
  return combineRows(basis, n, y, m);
}

/** x = Σ_k y_k · basis_k (first m rows of the basis). */
export function combineRows(basis: Float64Array, n: number, y: Float64Array, m: number): Float64Array {
  const x = new Float64Array(n);
  for (let r = 0; r < m; r++) {
    const c = y[r] as number;
    if (c === 0) continue;
    const src = r * n;
    for (let i = 0; i < n; i++) x[i] = (x[i] as number) + c * (basis[src + i] as number);
  }
  return x;
}

function normaliseRow(a: Float64Array, offset: number, n: number): void {
  const r = norm2Row(a, offset, n);
  if (r === 0) {
    for (let i = 0; i < n; i++) a[offset + i] = 1 / Math.sqrt(n);
    return;
  }
  for (let i = 0; i < n; i++) a[offset + i] = (a[offset + i] as number) / r;
}

function norm2Row(a: Float64Array, offset: number, n: number): number {
  let big = 0;
  for (let i = 0; i < n; i++) big = Math.max(big, Math.abs(a[offset + i] as number));
  if (big === 0) return 0;
  // Plain sum of squares unless the values could overflow/underflow it.
  if (big > 1e-150 && big < 1e150) return Math.sqrt(dotAt(a, offset, a, offset, n));
  let s = 0;
  for (let i = 0; i < n; i++) {
    const t = (a[offset + i] as number) / big;
    s += t * t;
  }
  return big * Math.sqrt(s);
}

/** One classical Gram–Schmidt pass of w against the first `rows` basis rows; coefficients into c. */
function orthogonalise(basis: Float64Array, rows: number, n: number, w: Float64Array, c: Float64Array): void {
  for (let r = 0; r < rows; r++) c[r] = dotAt(basis, r * n, w, 0, n);
  for (let r = 0; r < rows; r++) {
    const cr = c[r] as number;
    if (cr === 0) continue;
    const src = r * n;
    for (let i = 0; i < n; i++) w[i] = (w[i] as number) - cr * (basis[src + i] as number);
  }
}

/** Indices of (re, im) sorted by decreasing rank (insertion sort: m is small). */
function rankRitzValues(re: Float64Array, im: Float64Array, m: number, order: RitzOrder): Int32Array {
  const idx = new Int32Array(m);
  const mod = new Float64Array(m);
  for (let i = 0; i < m; i++) {
    idx[i] = i;
    mod[i] = Math.sqrt((re[i] as number) * (re[i] as number) + (im[i] as number) * (im[i] as number));
  }
  const before = (a: number, b: number): boolean => {
    if (order === "modulus") {
      const ma = mod[a] as number;
      const mb = mod[b] as number;
      if (Math.abs(ma - mb) > 1e-12 * Math.max(ma, mb)) return ma > mb;
    }
    const ra = re[a] as number;
    const rb = re[b] as number;
    if (ra !== rb) return ra > rb;
    return (im[a] as number) > (im[b] as number);
  };
  for (let i = 1; i < m; i++) {
    const x = idx[i] as number;
    let k = i - 1;
    while (k >= 0 && before(x, idx[k] as number)) {
      idx[k + 1] = idx[k] as number;
      k -= 1;
    }
    idx[k + 1] = x;
  }
  return idx;
}

/** Extend the wanted count by one when it would split a conjugate pair. */
function widenForPairs(re: Float64Array, im: Float64Array, sorted: Int32Array, wanted: number, m: number): number {
  if (wanted >= m) return m;
  const last = sorted[wanted - 1] as number;
  const next = sorted[wanted] as number;
  if (im[last] !== 0 && re[last] === re[next] && im[next] === -(im[last] as number)) return wanted + 1;
  return wanted;
}

/**
 * Apply one shift (a real one, or a conjugate pair as a double shift in real
 * arithmetic) to H, accumulating Q ← Q·(rotations). Negligible subdiagonal
 * entries are set to zero first and each unreduced diagonal block is swept on
 * its own, as implicit restarts require: sweeping through a tiny
 * subdiagonal would lose the bulge to underflow. A zero subdiagonal also
 * locks converged Ritz values in place.
 */
function applyShiftToBlocks(h: Float64Array, m: number, q: Float64Array, re: number, im: number): void {
  for (let k = 1; k < m; k++) {
    const sub = Math.abs(h[k * m + k - 1] as number);
    if (sub !== 0 && sub <= EPS * (Math.abs(h[(k - 1) * m + k - 1] as number) + Math.abs(h[k * m + k] as number))) h[k * m + k - 1] = 0;
  }
  let lo = 0;
  while (lo < m) {
    let hi = lo;
    while (hi + 1 < m && h[(hi + 1) * m + hi] !== 0) hi += 1;
    if (hi > lo) {
      if (im === 0) singleShiftSweep(h, m, lo, hi, re, q);
      else doubleShiftSweep(h, m, lo, hi, 2 * re, re * re + im * im, q);
    }
    lo = hi + 1;
  }
}

/** Real shift mu on the unreduced block lo..hi (implicit QR step by Givens rotations). */
function singleShiftSweep(h: Float64Array, m: number, lo: number, hi: number, mu: number, q: Float64Array): void {
  let x = (h[lo * m + lo] as number) - mu;
  let y = h[(lo + 1) * m + lo] as number;
  for (let k = lo; k < hi; k++) {
    const r = norm3(x, y, 0);
    if (r !== 0) {
      const c = x / r;
      const s = y / r;
      rotateRows(h, m, k, c, s, Math.max(lo, k - 1));
      rotateCols(h, m, k, c, s, Math.min(k + 2, hi));
      rotateCols(q, m, k, c, s, m - 1);
      if (k > lo) h[(k + 1) * m + k - 1] = 0;
    }
    if (k < hi - 1) {
      x = h[(k + 1) * m + k] as number;
      y = h[(k + 2) * m + k] as number;
    }
  }
}

/** Conjugate shift pair (sum s, product t) on the unreduced block lo..hi, by 3×3 reflectors. */
function doubleShiftSweep(h: Float64Array, m: number, lo: number, hi: number, s: number, t: number, q: Float64Array): void {
  const h00 = h[lo * m + lo] as number;
  const h01 = h[lo * m + lo + 1] as number;
  const h10 = h[(lo + 1) * m + lo] as number;
  const h11 = h[(lo + 1) * m + lo + 1] as number;
  let x = h00 * h00 + h01 * h10 - s * h00 + t;
  let y = h10 * (h00 + h11 - s);
  let z = hi - lo >= 2 ? h10 * (h[(lo + 2) * m + lo + 1] as number) : 0;
  for (let k = lo; k < hi - 1; k++) {
    // Scale first: only the direction of (x, y, z) matters, and tiny bulges
    // would otherwise underflow when squared.
    const scaleXYZ = Math.abs(x) + Math.abs(y) + Math.abs(z);
    if (scaleXYZ !== 0) {
      x /= scaleXYZ;
      y /= scaleXYZ;
      z /= scaleXYZ;
      const nrm = norm3(x, y, z);
      const u0 = x >= 0 ? x + nrm : x - nrm;
      const beta = 2 / (u0 * u0 + y * y + z * z);
      const u1 = y;
      const u2 = z;
      const r0 = k * m;
      const r1 = r0 + m;
      const r2 = r1 + m;
      for (let j = Math.max(lo, k - 1); j < m; j++) {
        const d = beta * (u0 * (h[r0 + j] as number) + u1 * (h[r1 + j] as number) + u2 * (h[r2 + j] as number));
        h[r0 + j] = (h[r0 + j] as number) - d * u0;
        h[r1 + j] = (h[r1 + j] as number) - d * u1;
        h[r2 + j] = (h[r2 + j] as number) - d * u2;
      }
      const iEnd = Math.min(k + 3, hi);
      for (let i = 0; i <= iEnd; i++) reflectRow(h, i * m + k, u0, u1, u2, beta);
      for (let i = 0; i < m; i++) reflectRow(q, i * m + k, u0, u1, u2, beta);
      if (k > lo) {
        h[(k + 1) * m + k - 1] = 0;
        h[(k + 2) * m + k - 1] = 0;
      }
    }
    x = h[(k + 1) * m + k] as number;
    y = h[(k + 2) * m + k] as number;
    z = k < hi - 2 ? (h[(k + 3) * m + k] as number) : 0;
  }
  const r = norm3(x, y, 0);
  if (r !== 0) {
    const k = hi - 1;
    const c = x / r;
    const sn = y / r;
    rotateRows(h, m, k, c, sn, Math.max(lo, k - 1));
    rotateCols(h, m, k, c, sn, hi);
    rotateCols(q, m, k, c, sn, m - 1);
    if (k > lo) h[(k + 1) * m + k - 1] = 0;
  }
}

function reflectRow(a: Float64Array, at: number, u0: number, u1: number, u2: number, beta: number): void {
  const d = beta * (u0 * (a[at] as number) + u1 * (a[at + 1] as number) + u2 * (a[at + 2] as number));
  a[at] = (a[at] as number) - d * u0;
  a[at + 1] = (a[at + 1] as number) - d * u1;
  a[at + 2] = (a[at + 2] as number) - d * u2;
}

/** Rows k, k+1 ← G·rows, G = [[c, s], [−s, c]], columns from j0 on. */
function rotateRows(a: Float64Array, m: number, k: number, c: number, s: number, j0: number): void {
  const r0 = k * m;
  const r1 = r0 + m;
  for (let j = j0; j < m; j++) {
    const p = a[r0 + j] as number;
    const v = a[r1 + j] as number;
    a[r0 + j] = c * p + s * v;
    a[r1 + j] = -s * p + c * v;
  }
}

/** Columns k, k+1 ← columns·Gᵀ, rows 0..iEnd. */
function rotateCols(a: Float64Array, m: number, k: number, c: number, s: number, iEnd: number): void {
  for (let i = 0; i <= iEnd; i++) {
    const at = i * m + k;
    const p = a[at] as number;
    const v = a[at + 1] as number;
    a[at] = c * p + s * v;
    a[at + 1] = -s * p + c * v;
  }
}
