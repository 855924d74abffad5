import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { createRandom, sensitivities } from "../../shared/demography";
import {
  bootstrapLambdas,
  clopperPearson,
  estimateStageFates,
  FATE_DEAD,
  FATE_UNKNOWN,
  groupByStage,
  summarizeBootstrap,
  wilson,
  type FateSample,
} from "../../shared/fielddata";

/** A sample from rows of [stage, fate, offspring]. */
function sample(stages: string[], rows: [number, number, number][]): FateSample {
  return {
    stages,
    stage: Int32Array.from(rows.map((r) => r[0])),
    fate: Int32Array.from(rows.map((r) => r[1])),
    offspring: Float64Array.from(rows.map((r) => r[2])),
  };
}
const repeat = (n: number, row: [number, number, number]) => Array.from({ length: n }, () => row);

// Two stages, S (0) and A (1). Ten S: 3 die, 4 stay S, 3 become A. Five A: 1 dies, 4 stay.
// Offspring of the A records: 2, 3, 1, 4, 0 (mean 2, sample variance 2.5); S records none (0).
const D = FATE_DEAD;
const small = sample(["S", "A"], [
  ...repeat(3, [0, D, 0]),
  ...repeat(4, [0, 0, 0]),
  ...repeat(3, [0, 1, 0]),
  [1, D, 2],
  [1, 1, 3],
  [1, 1, 1],
  [1, 1, 4],
  [1, 1, 0],
]);

describe("matrix from stage-fate records (hand-computed)", () => {
  it("pre-breeding census: a_ij = n_ij/n_j and F_0j = s₀ m̄_j", () => {
    const e = estimateStageFates(small, { census: "pre-breeding" });
    expect(e.n).toEqual([10, 5]);
    expect(e.counts).toEqual([
      [4, 0],
      [3, 4],
    ]);
    expect(e.U).toEqual([
      [0.4, 0],
      [0.3, 0.8],
    ]);
    expect(e.A).toEqual([
      [0.4, 2],
      [0.3, 0.8],
    ]);
    // λ of [[0.4, 2], [0.3, 0.8]]: (tr + √(tr² − 4 det))/2 = (1.2 + √(1.44 + 1.12))/2 = 1.4.
    expect(e.lambda).toBeCloseTo(1.4, 10);
    const fA = e.fecundity[1]!;
    expect(fA.mean).toBe(2);
    expect(fA.se).toBeCloseTo(Math.sqrt(2.5 / 5), 12);
    expect(e.survival[0]).toMatchObject({ k: 7, n: 10, p: 0.7 });
    // Half the offspring reach the first census: F = 0.5 · 2.
    expect(estimateStageFates(small, { census: "pre-breeding", offspringSurvival: 0.5 }).A[0]![1]).toBe(1);
  });

  it("post-breeding census: F_0j = Σ_i u_ij m̄_i (parents survive, then breed)", () => {
    const e = estimateStageFates(small, { census: "post-breeding" });
    // F_0S = u_AS · 2 = 0.6, F_0A = u_AA · 2 = 1.6 → A = [[1.0, 1.6], [0.3, 0.8]], λ = (1.8 + √(3.24 − 1.28))/2 = 1.6.
    expect(e.A[0]![0]).toBeCloseTo(1.0, 12);
    expect(e.A[0]![1]).toBeCloseTo(1.6, 12);
    expect(e.lambda).toBeCloseTo(1.6, 10);
    // Delta-method SE of F_0A = (multinomial part) + u_AA² SE(m̄_A)².
    const multinomial = (0.8 * 4 - 1.6 * 1.6) / 5;
    expect(e.fertility.find((f) => f.from === 1)!.se).toBeCloseTo(Math.sqrt(multinomial + 0.64 * 0.5), 12);
  });

  it("flags transitions never observed, empty stages and unknown fates instead of silent zeros", () => {
    const e = estimateStageFates(small, { census: "pre-breeding", method: "clopper-pearson" });
    const AtoS = e.transitions.find((t) => t.from === 1 && t.to === 0)!;
    expect(AtoS).toMatchObject({ k: 0, n: 5, p: 0, zeroCount: true });
    // Clopper–Pearson upper bound for 0 of n: 1 − (α/2)^(1/n) (closed form).
    expect(AtoS.ci!.upper).toBeCloseTo(1 - 0.025 ** (1 / 5), 10);
    expect(e.notes.map((n) => n.code)).toContain("zero-count");

    const withEmpty = estimateStageFates(sample(["S", "A", "Old"], [[0, 1, 0], [1, 1, 2], [2, FATE_UNKNOWN, 1]]), { census: "pre-breeding" });
    expect(withEmpty.n[2]).toBe(0);
    expect(withEmpty.unknown[2]).toBe(1);
    expect(withEmpty.notes.find((n) => n.code === "empty-stage")!.message).toContain("Old column is unknown, not zero");
    expect(withEmpty.notes.map((n) => n.code)).toContain("unknown-fates");
  });
});

describe("binomial intervals", () => {
  it("Wilson against its closed form", () => {
    const z = 1.959963984540054; // Φ⁻¹(0.975)
    for (const [k, n] of [[0, 10], [3, 10], [81, 263], [50, 50], [1, 2]] as const) {
      const p = k / n;
      const centre = (p + (z * z) / (2 * n)) / (1 + (z * z) / n);
      const half = (z / (1 + (z * z) / n)) * Math.sqrt((p * (1 - p)) / n + (z * z) / (4 * n * n));
      const w = wilson(k, n);
      expect(w.lower).toBeCloseTo(Math.max(0, centre - half), 10);
      expect(w.upper).toBeCloseTo(Math.min(1, centre + half), 10);
    }
    // Newcombe 1998 (Stat. Med. 17:857), Table I: 81/263 → 0.2553 to 0.3662 (from memory).
    expect(wilson(81, 263).lower).toBeCloseTo(0.2553, 4);
    expect(wilson(81, 263).upper).toBeCloseTo(0.3662, 4);
  });

  it("Clopper–Pearson against jstat's beta quantiles", () => {
    const beta = (jStat as unknown as { beta: { inv(p: number, a: number, b: number): number } }).beta;
    for (const [k, n] of [[1, 10], [3, 10], [81, 263], [49, 50], [7, 7]] as const) {
      const cp = clopperPearson(k, n, 0.9);
      expect(cp.lower).toBeCloseTo(beta.inv(0.05, k, n - k + 1), 8);
      expect(cp.upper).toBeCloseTo(k === n ? 1 : beta.inv(0.95, k + 1, n - k), 8);
    }
    expect(clopperPearson(10, 10).lower).toBeCloseTo(0.025 ** (1 / 10), 10);
  });
});

describe("bootstrap of λ", () => {
  function synthetic(seed: number, nS: number, nA: number): FateSample {
    const rng = createRandom(seed);
    const rows: [number, number, number][] = [];
    for (let k = 0; k < nS; k++) {
      const u = rng.uniform();
      rows.push([0, u < 0.3 ? D : u < 0.7 ? 0 : 1, 0]);
    }
    for (let k = 0; k < nA; k++) rows.push([1, rng.uniform() < 0.2 ? D : 1, rng.poisson(1.5)]);
    return sample(["S", "A"], rows);
  }

  it("is reproducible from the seed and chunk, and chunks differ from each other", () => {
    const s = synthetic(3, 60, 40);
    const g = groupByStage(s);
    const settings = { census: "pre-breeding" as const, offspringSurvival: 1, newbornStage: 0 };
    const a = bootstrapLambdas(g, settings, { seed: 11, stream: 0, count: 50 });
    expect(bootstrapLambdas(g, settings, { seed: 11, stream: 0, count: 50 })).toEqual(a);
    expect(bootstrapLambdas(g, settings, { seed: 11, stream: 1, count: 50 })).not.toEqual(a);
  });

  it("its spread matches the delta-method SE of λ from sensitivities (independent method)", () => {
    const s = synthetic(5, 800, 600);
    const e = estimateStageFates(s, { census: "pre-breeding" });
    const g = groupByStage(s);
    const lambdas = bootstrapLambdas(g, { census: "pre-breeding", offspringSurvival: 1, newbornStage: 0 }, { seed: 99, stream: 0, count: 3000 });
    const summary = summarizeBootstrap(lambdas, e.lambda!);
    // Var λ ≈ Σ_j [Σ_i,k s_ij s_kj Cov(u_ij, u_kj) + s_0j² Var(m̄_j)], multinomial covariances within a column.
    const S = sensitivities(e.A)!;
    let variance = 0;
    for (let j = 0; j < 2; j++) {
      const n = e.n[j]!;
      for (let i = 0; i < 2; i++) {
        for (let k = 0; k < 2; k++) {
          const cov = ((i === k ? e.U[i]![j]! : 0) - e.U[i]![j]! * e.U[k]![j]!) / n;
          variance += S[i]![j]! * S[k]![j]! * cov;
        }
      }
      variance += S[0]![j]! ** 2 * (e.fecundity[j]!.se ?? 0) ** 2;
    }
    expect(summary.sd / Math.sqrt(variance)).toBeGreaterThan(0.9);
    expect(summary.sd / Math.sqrt(variance)).toBeLessThan(1.1);
    expect(summary.lower).toBeLessThan(e.lambda!);
    expect(summary.upper).toBeGreaterThan(e.lambda!);
    expect(summary.histogram.reduce((a, b) => a + b.count, 0)).toBe(3000);
  });
});
