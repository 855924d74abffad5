// Seeded test matrices for the benchmark: random non-negative primitive
// matrices and a smooth size-structured kernel discretised on a grid.

/** Seeded uniform [0, 1) generator (mulberry32). */
export function seededRandom(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x6d2b79f5) >>> 0;
    let t = s;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/**
 * Random non-negative matrix with about `density` of its entries positive,
 * made primitive by a loop through all stages plus one stasis entry. Column
 * scale is kept in a demographic range (entries ≤ 1, a few fertilities ≤ 20).
 */
export function randomPrimitive(n: number, seed: number, density = 0.5): number[][] {
  const r = seededRandom(seed);
  const A = Array.from({ length: n }, () => Array.from({ length: n }, () => (r() < density ? (r() < 0.05 ? 20 * r() : r() / n) : 0)));
  for (let i = 0; i < n; i++) (A[(i + 1) % n] as number[])[i] = 0.05 + 0.5 * r();
  (A[0] as number[])[0] = 0.05 + 0.5 * r();
  return A;
}

/**
 * A size-structured kernel on n classes of size z in [0, 10]: survival rising
 * with size, growth z' ~ Normal(0.8 + 0.85 z, 0.6), flowering probability and
 * seed number rising with size, recruits ~ Normal(1, 0.4). Midpoint rule.
 * Strictly positive (Gaussian tails), so primitive; its λ₂ sits much closer
 * to λ than in a random matrix, which is the hard case for iterative solvers.
 */
export function sizeKernel(n: number): number[][] {
  const h = 10 / n;
  const z = Array.from({ length: n }, (_, k) => (k + 0.5) * h);
  const logistic = (x: number): number => 1 / (1 + Math.exp(-x));
  const normal = (x: number, mu: number, sd: number): number => Math.exp(-0.5 * ((x - mu) / sd) ** 2) / (sd * Math.sqrt(2 * Math.PI));
  return z.map((zi) =>
    z.map((zj) => {
      const survival = logistic(-1 + 0.6 * zj);
      const growth = normal(zi, 0.8 + 0.85 * zj, 0.6);
      const fecundity = logistic(-6 + 0.8 * zj) * Math.exp(0.5 + 0.2 * zj) * 0.05;
      const recruit = normal(zi, 1, 0.4);
      return h * (survival * growth + fecundity * recruit);
    }),
  );
}
