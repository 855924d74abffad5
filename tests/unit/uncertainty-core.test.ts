import jStat from "jstat";
import { describe, expect, it } from "vitest";
import { analyzeMatrix, createRandom } from "../../shared/demography";
import { dominantEigenDense, refinePerron } from "../../shared/demography/eigen";
import { toDense } from "../../shared/demography/matrix";
import { LifeCycleSchema, type LifeCycle, type LifeCycleInput } from "../../shared/lifecycle";
import { normalCdf } from "../../shared/risk";
import {
  histogramQuantile,
  lifeCycleDeltaMethod,
  mergeMonteCarlo,
  monteCarloChunk,
  monteCarloSetup,
  normalQuantile,
  rankStabilityLookup,
  rateSampler,
  summarizeDraws,
  uncertaintyModel,
  UncertaintyModelError,
  type MonteCarloResult,
} from "../../shared/uncertainty";
import { HistogramAccumulator } from "../../shared/uncertainty/summaries";
import { sizeClassLifeCycle } from "../../bench/uncertainty-model";

// Monte Carlo checks use fixed seeds and tolerances of Z standard errors
// (two-sided p ≈ 6e-5 per check), never exact digits.
const Z = 4;
const SEED = 4_242;

const stage = (id: string, name = id) => ({ id, name, position: { x: 0, y: 0 } });

/** An invented three-stage life cycle: juveniles, subadults, adults. */
function threeStage(rates: Record<string, Partial<LifeCycleInput["rates"][number]>> = {}, extra: Partial<LifeCycleInput> = {}): LifeCycle {
  const base: Record<string, number> = { s_j: 0.4, s_s: 0.6, g: 0.5, s_a: 0.8, f: 1.6 };
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "Test",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [stage("st_j", "Juvenile"), stage("st_s", "Subadult"), stage("st_a", "Adult")],
    rates: Object.entries(base).map(([name, value]) => ({ id: `vr_${name}`, name, value, ...rates[name] })),
    transitions: [
      { id: "tr_js", from: "st_j", to: "st_s", kind: "growth", rate: "s_j" },
      { id: "tr_ss", from: "st_s", to: "st_s", kind: "stasis", rate: "s_s * (1 - g)" },
      { id: "tr_sa", from: "st_s", to: "st_a", kind: "growth", rate: "s_s * g" },
      { id: "tr_aa", from: "st_a", to: "st_a", kind: "stasis", rate: "s_a" },
      { id: "tr_af", from: "st_a", to: "st_j", kind: "reproduction", rate: "f" },
    ],
    ...extra,
  });
}

/** One stage: λ is the sum of its stasis and reproduction rates. */
function oneStage(rates: LifeCycleInput["rates"], stasis: string, reproduction?: string): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: 2,
    name: "One stage",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: [stage("st_a", "Adult")],
    rates,
    transitions: [
      { id: "tr_s", from: "st_a", to: "st_a", kind: "stasis", rate: stasis },
      ...(reproduction ? [{ id: "tr_f", from: "st_a", to: "st_a", kind: "reproduction" as const, rate: reproduction }] : []),
    ],
  });
}

function runMonteCarlo(doc: LifeCycle, draws: number, seed = SEED, chunks = 2): MonteCarloResult {
  const setup = monteCarloSetup(doc);
  const per = Math.ceil(draws / chunks);
  const partials = Array.from({ length: chunks }, (_, k) => monteCarloChunk(setup, seed, k, Math.min(per, draws - k * per)));
  return mergeMonteCarlo(setup, seed, partials);
}

describe("rate laws", () => {
  it("a beta from a mean and SE reproduces that mean and SE exactly", () => {
    for (const [value, se] of [
      [0.4, 0.05],
      [0.93, 0.02],
      [0.02, 0.01],
    ] as const) {
      const model = uncertaintyModel({ rates: [{ id: "vr_p", name: "p", value, se }] });
      const u = model.rates[0]!;
      expect(u.law.kind).toBe("beta");
      expect(u.mean).toBeCloseTo(value, 12);
      expect(u.sd).toBeCloseTo(se, 12);
      expect([u.lower, u.upper]).toEqual([0, 1]);
    }
  });

  it("an SE impossible for a beta with the rate's mean is refused with a message naming the rate", () => {
    const model = uncertaintyModel({ rates: [{ id: "vr_sa", name: "s_a", value: 0.9, se: 0.35 }] });
    expect(model.rates).toHaveLength(0);
    expect(model.issues).toHaveLength(1);
    expect(model.issues[0]!.path).toEqual(["rates", 0, "se"]);
    // √(0.9 · 0.1) = 0.3 [derived]
    expect(model.issues[0]!.message).toBe("An SE of 0.35 is impossible for s_a: a beta distribution with mean 0.9 needs an SE below √(p(1 − p)) = 0.3.");
    const edge = uncertaintyModel({ rates: [{ id: "vr_x", name: "x", value: 1, se: 0.01 }] });
    expect(edge.issues[0]!.message).toContain("x = 1");
  });

  it("negative SEs and counts with k > n are refused by the document schema, naming the field", () => {
    const negative = LifeCycleSchema.safeParse({ ...threeStage(), rates: [{ id: "vr_s", name: "s", value: 0.5, se: -0.1 }], transitions: [] });
    expect(negative.success).toBe(false);
    expect(negative.error!.issues[0]!.path).toEqual(["rates", 0, "se"]);
    const counts = LifeCycleSchema.safeParse({ ...threeStage(), rates: [{ id: "vr_s", name: "s", value: 0.5, counts: { k: 12, n: 10 } }], transitions: [] });
    expect(counts.success).toBe(false);
    expect(counts.error!.issues[0]!.path).toEqual(["rates", 0, "counts", "k"]);
  });

  it("counts give the Jeffreys beta(k + ½, n − k + ½), proper even at k = n", () => {
    const model = uncertaintyModel({ rates: [{ id: "vr_p", name: "p", value: 1, counts: { k: 20, n: 20 } }] });
    const u = model.rates[0]!;
    expect(u.law).toEqual({ kind: "beta", alpha: 20.5, beta: 0.5 });
    expect(u.mean).toBeCloseTo(20.5 / 21, 14);
    expect(u.sd).toBeGreaterThan(0);
  });

  it("a CI becomes an SE of (upper − lower)/(2·z) (common practice), a lognormal for a rate above 1", () => {
    const model = uncertaintyModel({ rates: [{ id: "vr_m", name: "m", value: 3, ci: { lower: 2, upper: 4, level: 0.95 } }] });
    const u = model.rates[0]!;
    expect(u.law.kind).toBe("lognormal");
    expect(u.sd).toBeCloseTo(2 / (2 * 1.959963984540054), 9);
    expect(u.mean).toBeCloseTo(3, 12);
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 12);
  });

  it("a distribution that does not fit the rate's scale is refused", () => {
    const model = uncertaintyModel({ rates: [{ id: "vr_p", name: "p", value: 0.5, distribution: { family: "gamma", shape: 2, rate: 4 } }] });
    expect(model.issues[0]!.message).toBe("p is a probability; a gamma distribution can exceed 1. Use a beta distribution, counts or an SE.");
  });

  it("correlations that are not positive definite are reported naming a rate", () => {
    const rates = ["a", "b", "c"].map((name) => ({ id: `vr_${name}`, name, value: 0.5, se: 0.05 }));
    const model = uncertaintyModel({
      rates,
      correlations: [
        { a: "vr_a", b: "vr_b", r: 0.9 },
        { a: "vr_b", b: "vr_c", r: 0.9 },
        { a: "vr_a", b: "vr_c", r: -0.9 },
      ],
    });
    const issue = model.issues.find((i) => i.path[0] === "correlations")!;
    expect(issue.severity).toBe("error");
    expect(issue.message).toMatch(/not positive definite \(the check fails at c\)/);
  });
});

describe("delta method", () => {
  it("for λ = a + b it gives Var(λ) = sa² + sb² + 2 r sa sb exactly [derived]", () => {
    const doc = LifeCycleSchema.parse({
      ...oneStage(
        [
          { id: "vr_a", name: "a", value: 0.6, se: 0.05 },
          { id: "vr_b", name: "b", value: 0.3, se: 0.04 },
        ],
        "a",
        "b",
      ),
      correlations: [{ a: "vr_a", b: "vr_b", r: 0.5 }],
    });
    const d = lifeCycleDeltaMethod(doc)!;
    const variance = 0.05 ** 2 + 0.04 ** 2 + 2 * 0.5 * 0.05 * 0.04;
    expect(d.lambda!.estimate).toBeCloseTo(0.9, 14);
    expect(d.lambda!.se).toBeCloseTo(Math.sqrt(variance), 12);
    expect(d.lambda!.probabilityBelowOne).toBeCloseTo(normalCdf(0.1 / Math.sqrt(variance)), 12);
    expect(d.contributions.reduce((s, c) => s + c.varianceShare, 0)).toBeCloseTo(1, 12);
    // R0 = b / (1 − a) [derived]: its gradient (1/(1 − a)) and b/(1 − a)² by central differences.
    const gA = 0.3 / 0.16;
    const gB = 1 / 0.4;
    const varR0 = gA ** 2 * 0.05 ** 2 + gB ** 2 * 0.04 ** 2 + 2 * 0.5 * gA * gB * 0.05 * 0.04;
    expect(d.netReproductiveRate!.estimate).toBeCloseTo(0.75, 12);
    expect(d.netReproductiveRate!.se).toBeCloseTo(Math.sqrt(varR0), 6);
  });

  it("uses the vital-rate sensitivities: SE(λ) matches finite differences of λ", () => {
    const doc = threeStage({ s_j: { se: 0.05 }, s_a: { se: 0.03 }, f: { se: 0.2 }, g: { counts: { k: 25, n: 50 } } });
    const d = lifeCycleDeltaMethod(doc)!;
    const model = uncertaintyModel(doc);
    const lambdaAt = (name: string, dx: number) => {
      const changed = LifeCycleSchema.parse({ ...doc, rates: doc.rates.map((r) => (r.name === name ? { ...r, value: r.value + dx } : r)) });
      return analyzeMatrix({ A: buildA(changed) }).lambda;
    };
    let variance = 0;
    for (const r of model.rates) {
      const h = 1e-6;
      const g = (lambdaAt(r.name, h) - lambdaAt(r.name, -h)) / (2 * h);
      variance += g * g * r.sd * r.sd;
    }
    expect(d.lambda!.se).toBeCloseTo(Math.sqrt(variance), 8);
    expect(d.ratesWithoutUncertainty).toEqual(["s_s"]);
  });

  it("returns null when no rate gives uncertainty", () => {
    expect(lifeCycleDeltaMethod(threeStage())).toBeNull();
  });
});

function buildA(doc: LifeCycle): number[][] {
  const n = doc.stages.length;
  const idx = new Map(doc.stages.map((s, i) => [s.id, i]));
  const values = new Map(doc.rates.map((r) => [r.name, r.value]));
  const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  // These test formulas are products and 1 − x only: evaluate them by hand.
  const evalFormula = (f: string): number =>
    f.split("*").reduce((p, term) => {
      const t = term.trim();
      const m = /^\(1 - (\w+)\)$/.exec(t);
      return p * (m ? 1 - values.get(m[1]!)! : values.get(t)!);
    }, 1);
  for (const t of doc.transitions) A[idx.get(t.to)!]![idx.get(t.from)!]! += typeof t.rate === "number" ? t.rate : evalFormula(t.rate);
  return A;
}

describe("Monte Carlo", () => {
  it("P(λ < 1) for one stage with λ = s + 0.15, s ~ beta, is I_0.85(α, β) [derived]", () => {
    const doc = oneStage([{ id: "vr_s", name: "s", value: 0.8, se: 0.06 }], "s", "0.15");
    const r = runMonteCarlo(doc, 10_000);
    const { alpha, beta } = uncertaintyModel(doc).rates[0]!.law as { alpha: number; beta: number };
    const exact = jStat.ibeta(0.85, alpha, beta);
    const se = Math.sqrt((exact * (1 - exact)) / 10_000);
    expect(Math.abs(r.lambda.probabilityBelowOne - exact)).toBeLessThan(Z * se);
    expect(r.lambda.probabilityBelowOneInterval.lower).toBeLessThan(exact);
    expect(r.lambda.probabilityBelowOneInterval.upper).toBeGreaterThan(exact);
  });

  it("P(λ < 1) for one stage with a lognormal fecundity is Φ(−meanlog/sdlog) [derived]", () => {
    const doc = oneStage([{ id: "vr_m", name: "m", value: 1.1, scale: "non-negative", distribution: { family: "lognormal", meanlog: 0.05, sdlog: 0.1 } }], "0", "m");
    const r = runMonteCarlo(doc, 10_000);
    const exact = normalCdf(-0.05 / 0.1);
    expect(Math.abs(r.lambda.probabilityBelowOne - exact)).toBeLessThan(Z * Math.sqrt((exact * (1 - exact)) / 10_000));
  });

  it("delta-method and Monte Carlo intervals agree when the variance is small", () => {
    const doc = threeStage({ s_j: { se: 0.01 }, s_s: { se: 0.01 }, s_a: { se: 0.008 }, f: { se: 0.03 } });
    const d = lifeCycleDeltaMethod(doc)!;
    const r = runMonteCarlo(doc, 10_000);
    // SD of a sample SD from 10,000 draws is about SD/√(2·10⁴) = 0.7 %: allow 4 % for that and second-order terms.
    expect(r.lambda.sd).toBeGreaterThan(d.lambda!.se * 0.96);
    expect(r.lambda.sd).toBeLessThan(d.lambda!.se * 1.04);
    const width = d.lambda!.upper - d.lambda!.lower;
    expect(Math.abs(r.lambda.lower - d.lambda!.lower)).toBeLessThan(0.05 * width);
    expect(Math.abs(r.lambda.upper - d.lambda!.upper)).toBeLessThan(0.05 * width);
    expect(Math.abs(r.netReproductiveRate.sd - d.netReproductiveRate!.se)).toBeLessThan(0.05 * d.netReproductiveRate!.se);
    expect(Math.abs(r.meanAgeOfParents.sd - d.meanAgeOfParents!.se)).toBeLessThan(0.05 * d.meanAgeOfParents!.se);
    // P(λ < 1) from both, within the Monte Carlo error plus the normal approximation's.
    expect(Math.abs(r.lambda.probabilityBelowOne - d.lambda!.probabilityBelowOne)).toBeLessThan(0.03);
  });

  it("λ for an unbounded normal rate: both methods give Φ(1) for λ = 0.5 + b, b ~ N(0.45, 0.05) [derived]", () => {
    const doc = oneStage([{ id: "vr_b", name: "b", value: 0.45, scale: "unbounded", se: 0.05 }], "0.5 + b");
    const d = lifeCycleDeltaMethod(doc)!;
    expect(d.lambda!.probabilityBelowOne).toBeCloseTo(normalCdf(1), 12);
    const r = runMonteCarlo(doc, 10_000);
    const exact = normalCdf(1);
    expect(Math.abs(r.lambda.probabilityBelowOne - exact)).toBeLessThan(Z * Math.sqrt((exact * (1 - exact)) / 10_000));
  });

  it("every draw stays within its rate's bounds, and correlations are honoured through the copula", () => {
    const doc = threeStage(
      { s_j: { se: 0.15 }, s_a: { value: 0.98, se: 0.015 }, f: { se: 1.2 }, g: { counts: { k: 0, n: 8 }, value: 0 } },
      { correlations: [{ a: "vr_s_j", b: "vr_f", r: 0.6 }] },
    );
    const setup = monteCarloSetup(doc);
    const sample = rateSampler(setup);
    const rng = createRandom(SEED, 0);
    const values = Float64Array.from(setup.compiled.baseValues);
    const sj: number[] = [];
    const f: number[] = [];
    for (let k = 0; k < 20_000; k++) {
      sample(rng, values);
      const [vsj, , vg, vsa, vf] = values;
      expect(vsj! >= 0 && vsj! <= 1 && vg! >= 0 && vg! <= 1 && vsa! >= 0 && vsa! <= 1 && vf! > 0).toBe(true);
      sj.push(vsj!);
      f.push(vf!);
    }
    // Spearman correlation of a Gaussian copula: (6/π)·arcsin(r/2) [derived; Kruskal 1958].
    const expected = (6 / Math.PI) * Math.asin(0.3);
    expect(Math.abs(spearman(sj, f) - expected)).toBeLessThan(0.02);
  });

  it("is reproducible from its seed; chunks use different streams", () => {
    const setup = monteCarloSetup(threeStage({ s_j: { se: 0.05 }, f: { se: 0.2 } }));
    expect(monteCarloChunk(setup, 9, 0, 500)).toEqual(monteCarloChunk(setup, 9, 0, 500));
    expect(monteCarloChunk(setup, 9, 1, 500).lambda).not.toEqual(monteCarloChunk(setup, 9, 0, 500).lambda);
    expect(monteCarloChunk(setup, 10, 0, 500).lambda).not.toEqual(monteCarloChunk(setup, 9, 0, 500).lambda);
  });

  it("rank stability: a lever that dominates ranks first in every draw; shares of first place sum to 1", () => {
    const doc = threeStage({ s_a: { value: 0.9, se: 0.01 }, f: { value: 0.3, se: 0.01 }, s_j: { se: 0.01 } });
    const r = runMonteCarlo(doc, 2_000);
    expect(r.rateLevers[0]!.name).toBe("s_a");
    expect(r.rateLevers[0]!.rankFirst).toBe(1);
    expect(r.rateLevers.reduce((s, l) => s + l.rankFirst, 0)).toBeCloseTo(1, 12);
    expect(r.entryLevers.reduce((s, l) => s + l.rankFirst, 0)).toBeCloseTo(1, 12);
    const lookup = rankStabilityLookup(r);
    expect(lookup.rate("vr_s_a")!.rankFirst).toBe(1);
    expect(lookup.entry("st_a", "st_a")!.rankFirst).toBe(1);
    expect(lookup.rate("vr_nothing")).toBeUndefined();
  });

  it("rank stability counts match ranking each draw with the full analysis (an independent path)", () => {
    // Wide SEs so that the top lever changes between draws.
    const doc = threeStage({ s_j: { se: 0.15 }, s_s: { se: 0.15 }, g: { se: 0.2 }, s_a: { value: 0.7, se: 0.15 }, f: { se: 0.8 } });
    const draws = 400;
    const r = runMonteCarlo(doc, draws, SEED, 1);
    const setup = monteCarloSetup(doc);
    const sample = rateSampler(setup);
    const rng = createRandom(SEED, 0);
    const values = Float64Array.from(setup.compiled.baseValues);
    const first = new Map<string, number>();
    const lambdas: number[] = [];
    for (let d = 0; d < draws; d++) {
      sample(rng, values);
      const m = setup.compiled.evaluate(values);
      const a = analyzeMatrix({ A: m.A });
      lambdas.push(a.lambda);
      const vr = setup.compiled.vitalRateSensitivities(a.sensitivity!, a.lambda, values);
      const top = vr.reduce((best, x) => (Math.abs(x.elasticity) > Math.abs(best.elasticity) ? x : best));
      first.set(top.name, (first.get(top.name) ?? 0) + 1);
    }
    expect(first.size).toBeGreaterThan(1);
    for (const l of r.rateLevers) expect(l.rankFirst).toBeCloseTo((first.get(l.name) ?? 0) / draws, 12);
    expect(r.lambda.median).toBeCloseTo(summarizeDraws(Float64Array.from(lambdas), 0.95).median, 10);
    // elasticity intervals hold the elasticity at the rates' values
    for (const l of r.rateLevers) {
      expect(l.elasticity.lower).toBeLessThanOrEqual(l.elasticityAtValue);
      expect(l.elasticity.upper).toBeGreaterThanOrEqual(l.elasticityAtValue);
    }
    expect(r.stages.reduce((sum, st) => sum + st.w.mean, 0)).toBeCloseTo(1, 9);
  });

  it("refuses to run without uncertainty, or with an impossible SE, naming the field", () => {
    expect(() => monteCarloSetup(threeStage())).toThrow(UncertaintyModelError);
    try {
      monteCarloSetup(threeStage({ s_a: { se: 0.5 } }));
      expect.unreachable();
    } catch (err) {
      expect((err as UncertaintyModelError).issues[0]!.path).toEqual(["rates", 3, "se"]);
    }
  });
});

describe("summaries and the warm-started Perron refinement", () => {
  it("histogram percentiles are within 0.25 % of the exact sample percentiles", () => {
    const rng = createRandom(3);
    const acc = new HistogramAccumulator();
    const xs = new Float64Array(20_000);
    for (let i = 0; i < xs.length; i++) {
      xs[i] = Math.exp(rng.normal() * 0.3) * 0.2;
      acc.add(xs[i]!);
    }
    const h = acc.toJSON();
    const exact = summarizeDraws(xs, 0.95);
    expect(Math.abs(histogramQuantile(h, 0.025) / exact.lower - 1)).toBeLessThan(0.0025);
    expect(Math.abs(histogramQuantile(h, 0.975) / exact.upper - 1)).toBeLessThan(0.0025);
  });

  it("agrees with the full eigen-analysis on perturbed matrices", () => {
    const rng = createRandom(11);
    const doc = sizeClassLifeCycle(12);
    const setup = monteCarloSetup(doc);
    const base = toDense(setup.compiled.evaluate().A);
    const e0 = dominantEigenDense(base, 12, { second: false });
    for (let trial = 0; trial < 50; trial++) {
      const a = base.map((x) => (x > 0 ? x * (1 + 0.1 * (rng.uniform() - 0.5)) : 0));
      const refined = refinePerron(a, 12, e0.w, e0.v)!;
      const full = dominantEigenDense(a, 12, { second: false });
      expect(refined.lambda).toBeCloseTo(full.lambda, 12);
      refined.w.forEach((x, i) => expect(x).toBeCloseTo(full.w[i]!, 10));
      refined.v.forEach((x, i) => expect(x / full.v[i]!).toBeCloseTo(1, 8));
    }
  });

  it("refuses a pair that is not the Perron pair", () => {
    // Started next to the eigenvalue 0.5 (eigenvector (0, 1), not positive), it converges there and is refused.
    const a = Float64Array.of(2, 0.001, 0.001, 0.5);
    expect(refinePerron(a, 2, [0.001, 1], [0.001, 1])).toBeNull();
    expect(refinePerron(a, 2, [1, 0.001], [1, 0.001])!.lambda).toBeCloseTo(analyzeMatrix({ A: [[2, 0.001], [0.001, 0.5]] }).lambda, 12);
  });
});

function spearman(x: readonly number[], y: readonly number[]): number {
  const rank = (v: readonly number[]) => {
    const order = v.map((_, i) => i).sort((a, b) => v[a]! - v[b]!);
    const r = new Array<number>(v.length);
    order.forEach((i, k) => (r[i] = k));
    return r;
  };
  const rx = rank(x);
  const ry = rank(y);
  const n = x.length;
  const mean = (n - 1) / 2;
  let sxy = 0;
  let sxx = 0;
  let syy = 0;
  for (let i = 0; i < n; i++) {
    sxy += (rx[i]! - mean) * (ry[i]! - mean);
    sxx += (rx[i]! - mean) ** 2;
    syy += (ry[i]! - mean) ** 2;
  }
  return sxy / Math.sqrt(sxx * syy);
}
