/**
 * One-dimensional root finding and maximisation on a bracket: the edges of
 * λ(T)'s persistence window and its optimum (Climate), break-even values of a
 * lever (Levers). Pure maths.
 */

export interface Root {
  x: number;
  /** f at x. */
  fx: number;
  iterations: number;
}

export interface BrentOptions {
  /** Stop when |f| ≤ ftol (default 1e-12). */
  ftol?: number;
  /** Stop when the bracket is narrower than xtol plus a few ulps of x (default 1e-12). */
  xtol?: number;
  maxIterations?: number;
  /** f(a) and f(b) when the caller has them already (each evaluation may be a whole eigen-analysis). */
  fa?: number;
  fb?: number;
  /** f not finite inside the bracket: "throw" a RangeError (default), or "stop" and return the best point so far. */
  notFinite?: "throw" | "stop";
}

/**
 * A root of f in [a, b] where f(a) and f(b) differ in sign, by Brent's method
 * (Brent 1973, "Algorithms for Minimization without Derivatives", ch. 4):
 * inverse quadratic interpolation or secant steps, falling back to bisection
 * so the bracket always shrinks. Stops when |f| ≤ ftol or the bracket is
 * narrower than xtol (plus a few ulps of x).
 */
export function brentRoot(f: (x: number) => number, a: number, b: number, options: BrentOptions = {}): Root {
  const ftol = options.ftol ?? 1e-12;
  const xtol = options.xtol ?? 1e-12;
  const maxIterations = options.maxIterations ?? 200;
  let fa = options.fa ?? f(a);
  let fb = options.fb ?? f(b);
  if (!(Number.isFinite(fa) && Number.isFinite(fb))) throw new RangeError("The function is not finite at the ends of the bracket.");
  if (fa === 0) return { x: a, fx: 0, iterations: 0 };
  if (fb === 0) return { x: b, fx: 0, iterations: 0 };
  if (Math.sign(fa) === Math.sign(fb)) throw new RangeError("The bracket does not contain a sign change.");
  let c = a;
  let fc = fa;
  let d = b - a;
  let e = d;
  let it = 0;
  for (; it < maxIterations; it++) {
    if (Math.sign(fb) === Math.sign(fc)) {
      c = a;
      fc = fa;
      d = b - a;
      e = d;
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b;
      b = c;
      c = a;
      fa = fb;
      fb = fc;
      fc = fa;
    }
    const tol = 2 * Number.EPSILON * Math.abs(b) + 0.5 * xtol;
    const m = 0.5 * (c - b);
    if (Math.abs(fb) <= ftol || Math.abs(m) <= tol) break;
    if (Math.abs(e) >= tol && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa;
      let p: number;
      let q: number;
      if (a === c) {
        p = 2 * m * s;
        q = 1 - s;
      } else {
        const qq = fa / fc;
        const r = fb / fc;
        p = s * (2 * m * qq * (qq - r) - (b - a) * (r - 1));
        q = (qq - 1) * (r - 1) * (s - 1);
      }
      if (p > 0) q = -q;
      else p = -p;
      if (2 * p < Math.min(3 * m * q - Math.abs(tol * q), Math.abs(e * q))) {
        e = d;
        d = p / q;
      } else {
        d = m;
        e = d;
      }
    } else {
      d = m;
      e = d;
    }
    const next = b + (Math.abs(d) > tol ? d : m > 0 ? tol : -tol);
    const fNext = f(next);
    if (!Number.isFinite(fNext)) {
      if (options.notFinite === "stop") return { x: b, fx: fb, iterations: it + 1 };
      throw new RangeError(`The function is not finite at ${next}.`);
    }
    a = b;
    fa = fb;
    b = next;
    fb = fNext;
  }
  return { x: b, fx: fb, iterations: it };
}

const GOLDEN = (3 - Math.sqrt(5)) / 2;

export interface GoldenOptions {
  /** Stop when the bracket is at most this wide (default 1e-7). */
  xtol?: number;
  /** Stop after this many narrowings at the most (default: none). */
  maxIterations?: number;
  /** What is maximised, from f's value (default: the value itself). */
  score?: (fx: number) => number;
  /** Stop early once the two inner values satisfy this (e.g. they differ in sign). */
  stop?: (f1: number, f2: number) => boolean;
}

/**
 * The x in [a, b] maximising score(f(x)) for a unimodal score there, by
 * golden-section search (Kiefer 1953), with f's value at that x. A point
 * whose score is NaN never wins a comparison.
 */
export function goldenSection(f: (x: number) => number, a: number, b: number, options: GoldenOptions = {}): { x: number; fx: number } {
  const xtol = options.xtol ?? 1e-7;
  const maxIterations = options.maxIterations ?? Infinity;
  const score = options.score ?? ((v: number) => v);
  let x1 = a + GOLDEN * (b - a);
  let x2 = b - GOLDEN * (b - a);
  let f1 = f(x1);
  let f2 = f(x2);
  for (let it = 0; b - a > xtol && it < maxIterations; it++) {
    if (score(f1) < score(f2)) {
      a = x1;
      x1 = x2;
      f1 = f2;
      x2 = b - GOLDEN * (b - a);
      f2 = f(x2);
    } else {
      b = x2;
      x2 = x1;
      f2 = f1;
      x1 = a + GOLDEN * (b - a);
      f1 = f(x1);
    }
    if (options.stop?.(f1, f2)) break;
  }
  return score(f1) >= score(f2) ? { x: x1, fx: f1 } : { x: x2, fx: f2 };
}

/** The x in [a, b] maximising a unimodal f there, by golden-section search (Kiefer 1953), to within xtol. */
export function goldenMaximum(f: (x: number) => number, a: number, b: number, xtol = 1e-7): { x: number; fx: number } {
  return goldenSection(f, a, b, { xtol });
}
