/**
 * Monte Carlo propagation of the vital rates' uncertainty: each draw takes
 * every uncertain rate from its law (laws.ts), correlated through a Gaussian
 * copula (z = L ε, x_i = F_i⁻¹(Φ(z_i)); shared/risk/distributions.ts), keeps
 * the other rates at their values, and computes λ, w, v, elasticities, R0
 * and the generation times of the resulting matrix (evaluate.ts). Results are
 * percentile intervals, P(λ < 1) as the share of draws below 1, a histogram
 * of λ and how stable the ranking of levers by |elasticity| is across draws.
 *
 * Draws are split into chunks; chunk k uses the random stream (seed, k), so
 * a chunk's result depends only on the run's input and k.
 */
import { createRandom, type Random } from "../demography/index";
import { buildMatrices, compileLifeCycle, LifeCycleFormulaError, type CompiledLifeCycle, type LifeCycle } from "../lifecycle/index";
import { normalScoreMap } from "../risk/distributions";
import { wilsonInterval } from "../stats/normal";
import { drawEvaluator, ratesUsedByFormulas, type DrawEvaluator, type DrawResult } from "./evaluate";
import { uncertaintyModel, type SamplingLaw, type UncertaintyIssue, type UncertaintyModel } from "./laws";
import { decodeFloat64, encodeFloat64, HistogramAccumulator, mergeHistograms, summarizeDraws, summarizeHistogram, type ItemHistogram, type ItemSummary } from "./summaries";
import { emptyRankCounts, mergeRankCounts, rankStability, recordRanks, type LeverStability, type RankCounts } from "./rank-stability";

export const MONTE_CARLO_LEVEL = 0.95;
/** Bins of the λ histogram shown. */
export const LAMBDA_HISTOGRAM_BINS = 40;

/** A problem that stops a Monte Carlo run, tied to the document field (or the settings). */
export class UncertaintyModelError extends Error {
  override readonly name = "UncertaintyModelError";
  constructor(readonly issues: readonly { path: (string | number)[]; message: string }[]) {
    super(issues[0]?.message ?? "The uncertainty cannot be used.");
  }
}

export interface MonteCarloSetup {
  readonly doc: LifeCycle;
  readonly compiled: CompiledLifeCycle;
  readonly evaluator: DrawEvaluator;
  readonly model: UncertaintyModel;
  /** Normal score → rate value, one per uncertain rate. */
  readonly maps: readonly ((z: number) => number)[];
}

function scoreMap(law: SamplingLaw): (z: number) => number {
  if (law.kind === "normal") {
    const { mean, sd } = law;
    return (z) => mean + sd * z;
  }
  return normalScoreMap(law);
}

/** Everything a run needs from its document; throws UncertaintyModelError naming the field when it cannot run. */
export function monteCarloSetup(doc: LifeCycle): MonteCarloSetup {
  if (doc.stages.length === 0) throw new UncertaintyModelError([{ path: ["stages"], message: "The life cycle has no stages yet." }]);
  let compiled: CompiledLifeCycle;
  try {
    compiled = compileLifeCycle(doc);
    compiled.evaluate();
  } catch (err) {
    if (err instanceof LifeCycleFormulaError) {
      const index = new Map(doc.transitions.map((t, i) => [t.id, i]));
      throw new UncertaintyModelError(err.errors.map((e) => ({ path: ["transitions", index.get(e.transitionId) ?? 0, "rate"], message: e.message })));
    }
    throw err;
  }
  const model = uncertaintyModel(doc);
  const errors = model.issues.filter((i) => i.severity === "error");
  if (errors.length > 0) throw new UncertaintyModelError(errors);
  const used = new Set(ratesUsedByFormulas(doc));
  if (!model.rates.some((r) => used.has(r.index))) {
    throw new UncertaintyModelError([{ path: ["rates"], message: "No vital rate used by the arrows has an SE, CI, counts or distribution: give the uncertainty of at least one in the Rates table." }]);
  }
  const entries = buildMatrices(doc).entries;
  const evaluator = drawEvaluator(compiled, entries, doc.transitions.map((t) => t.rate), [...used]);
  return { doc, compiled, evaluator, model, maps: model.rates.map((r) => scoreMap(r.law)) };
}

/** One chunk's partial result (JSON). */
export interface MonteCarloPartial {
  draws: number;
  /** base64 Float64Array per draw. */
  lambda: string;
  r0: string;
  generationTimeR0: string;
  meanAgeOfParents: string;
  w: ItemHistogram[];
  v: ItemHistogram[];
  entryElasticity: ItemHistogram[];
  rateElasticity: ItemHistogram[];
  entryRanks: RankCounts;
  rateRanks: RankCounts;
}

/** Draws every uncertain rate into `values` (document order; the other rates are left as they are). */
export function rateSampler(setup: Pick<MonteCarloSetup, "model" | "maps">): (rng: Random, values: Float64Array) => void {
  const { model, maps } = setup;
  const m = model.rates.length;
  const L = model.cholesky;
  const eps = new Float64Array(m);
  const slots = Int32Array.from(model.rates, (r) => r.index);
  return (rng, values) => {
    for (let i = 0; i < m; i++) eps[i] = rng.normal();
    for (let i = 0; i < m; i++) {
      let z = eps[i]!;
      if (L) {
        z = 0;
        for (let k = 0; k <= i; k++) z += L[i * m + k]! * eps[k]!;
      }
      values[slots[i]!] = maps[i]!(z);
    }
  };
}

/** Draws `count` samples with random stream (seed, chunkIndex). */
export function monteCarloChunk(setup: MonteCarloSetup, seed: number, chunkIndex: number, count: number): MonteCarloPartial {
  const { compiled, evaluator, model } = setup;
  const rng = createRandom(seed, chunkIndex);
  const values = Float64Array.from(compiled.baseValues);
  const sample = rateSampler(setup);
  const n = evaluator.n;
  const lambda = new Float64Array(count);
  const r0 = new Float64Array(count);
  const tR0 = new Float64Array(count);
  const tBar = new Float64Array(count);
  const acc = () => new HistogramAccumulator();
  const w = Array.from({ length: n }, acc);
  const v = Array.from({ length: n }, acc);
  const ee = evaluator.cells.map(acc);
  const re = evaluator.leverRates.map(acc);
  const entryRanks = emptyRankCounts(evaluator.cells.length);
  const rateRanks = emptyRankCounts(evaluator.leverRates.length);
  let out: DrawResult | undefined;
  for (let d = 0; d < count; d++) {
    sample(rng, values);
    try {
      out = evaluator.evaluate(values, out);
    } catch (err) {
      if (err instanceof LifeCycleFormulaError) {
        const drawn = model.rates.map((r) => `${r.name} = ${Number(values[r.index]!.toPrecision(4))}`).join(", ");
        throw new UncertaintyModelError([{ path: ["rates"], message: `With the drawn rates (${drawn}) an arrow's rate cannot be computed: ${err.errors[0]?.message ?? err.message} Narrow the uncertainty or change the formula.` }]);
      }
      throw err;
    }
    lambda[d] = out.lambda;
    r0[d] = out.r0;
    tR0[d] = out.generationTimeR0;
    tBar[d] = out.meanAgeOfParents;
    for (let i = 0; i < n; i++) {
      w[i]!.add(out.w[i]!);
      v[i]!.add(out.v[i]!);
    }
    for (let k = 0; k < ee.length; k++) ee[k]!.add(out.entryElasticity[k]!);
    for (let k = 0; k < re.length; k++) re[k]!.add(out.rateElasticity[k]!);
    recordRanks(entryRanks, out.entryElasticity);
    recordRanks(rateRanks, out.rateElasticity);
  }
  return {
    draws: count,
    lambda: encodeFloat64(lambda),
    r0: encodeFloat64(r0),
    generationTimeR0: encodeFloat64(tR0),
    meanAgeOfParents: encodeFloat64(tBar),
    w: w.map((h) => h.toJSON()),
    v: v.map((h) => h.toJSON()),
    entryElasticity: ee.map((h) => h.toJSON()),
    rateElasticity: re.map((h) => h.toJSON()),
    entryRanks,
    rateRanks,
  };
}

export interface LambdaHistogram {
  /** LAMBDA_HISTOGRAM_BINS + 1 edges, increasing. */
  edges: number[];
  counts: number[];
}

export interface MonteCarloResult {
  draws: number;
  seed: number;
  level: number;
  lambda: ItemSummary & { probabilityBelowOne: number; probabilityBelowOneInterval: { lower: number; upper: number } };
  lambdaHistogram: LambdaHistogram;
  netReproductiveRate: ItemSummary;
  generationTimeR0: ItemSummary;
  meanAgeOfParents: ItemSummary;
  /** λ, R0 and generation times at the rates' values (the point estimate). */
  atValues: { lambda: number; netReproductiveRate: number | null; generationTimeR0: number | null; meanAgeOfParents: number | null };
  stages: { id: string; name: string; w: ItemSummary; v: ItemSummary }[];
  /** Vital rates used by formulas: elasticity interval and rank stability; ranked by elasticity at the values. */
  rateLevers: (LeverStability & { rateId: string; name: string; elasticity: ItemSummary; elasticityAtValue: number })[];
  /** Non-zero matrix entries: a_ij with i = `to`, j = `from`. */
  entryLevers: (LeverStability & { from: string; to: string; fromName: string; toName: string; elasticity: ItemSummary; elasticityAtValue: number })[];
  /** Rates drawn and how. */
  uncertainRates: { rateId: string; name: string; source: string; mean: number; sd: number; lower: number; upper: number }[];
  issues: UncertaintyIssue[];
}

function lambdaHistogram(values: Float64Array): LambdaHistogram {
  const finite = values.filter((x) => Number.isFinite(x));
  let lo = Infinity;
  let hi = -Infinity;
  for (const x of finite) {
    if (x < lo) lo = x;
    if (x > hi) hi = x;
  }
  if (!(hi > lo)) {
    const c = Number.isFinite(lo) ? lo : 1;
    lo = c - 1e-6 * Math.max(1, Math.abs(c));
    hi = c + 1e-6 * Math.max(1, Math.abs(c));
  }
  const width = (hi - lo) / LAMBDA_HISTOGRAM_BINS;
  const counts = new Array<number>(LAMBDA_HISTOGRAM_BINS).fill(0);
  for (const x of finite) counts[Math.min(LAMBDA_HISTOGRAM_BINS - 1, Math.floor((x - lo) / width))]!++;
  return { edges: Array.from({ length: LAMBDA_HISTOGRAM_BINS + 1 }, (_, k) => lo + k * width), counts };
}

const concat = (parts: readonly string[]): Float64Array => {
  const arrays = parts.map(decodeFloat64);
  const out = new Float64Array(arrays.reduce((s, a) => s + a.length, 0));
  let at = 0;
  for (const a of arrays) {
    out.set(a, at);
    at += a.length;
  }
  return out;
};

const orNull = (x: number) => (Number.isFinite(x) ? x : null);

/** Combine the chunks (in chunk order) into the run's result. */
export function mergeMonteCarlo(setup: MonteCarloSetup, seed: number, partials: readonly MonteCarloPartial[]): MonteCarloResult {
  const { doc, evaluator, compiled, model } = setup;
  const level = MONTE_CARLO_LEVEL;
  const draws = partials.reduce((s, p) => s + p.draws, 0);
  const lambdas = concat(partials.map((p) => p.lambda));
  const lambdaSummary = summarizeDraws(lambdas, level);
  let below = 0;
  for (const x of lambdas) if (x < 1) below++;
  const at = evaluator.evaluate(compiled.baseValues);
  const items = (pick: (p: MonteCarloPartial) => ItemHistogram[], count: number) => Array.from({ length: count }, (_, k) => summarizeHistogram(mergeHistograms(partials.map((p) => pick(p)[k]!)), level));
  const n = evaluator.n;
  const ws = items((p) => p.w, n);
  const vs = items((p) => p.v, n);
  const ees = items((p) => p.entryElasticity, evaluator.cells.length);
  const res = items((p) => p.rateElasticity, evaluator.leverRates.length);
  const entryStability = rankStability(mergeRankCounts(partials.map((p) => p.entryRanks)));
  const rateStability = rankStability(mergeRankCounts(partials.map((p) => p.rateRanks)));
  const byAbs = <T extends { elasticityAtValue: number }>(list: T[]) => list.sort((a, b) => Math.abs(b.elasticityAtValue) - Math.abs(a.elasticityAtValue));
  return {
    draws,
    seed,
    level,
    lambda: { ...lambdaSummary, probabilityBelowOne: below / draws, probabilityBelowOneInterval: wilsonInterval(below, draws) },
    lambdaHistogram: lambdaHistogram(lambdas),
    netReproductiveRate: summarizeDraws(concat(partials.map((p) => p.r0)), level),
    generationTimeR0: summarizeDraws(concat(partials.map((p) => p.generationTimeR0)), level),
    meanAgeOfParents: summarizeDraws(concat(partials.map((p) => p.meanAgeOfParents)), level),
    atValues: { lambda: at.lambda, netReproductiveRate: orNull(at.r0), generationTimeR0: orNull(at.generationTimeR0), meanAgeOfParents: orNull(at.meanAgeOfParents) },
    stages: doc.stages.map((s, i) => ({ id: s.id, name: s.name, w: ws[i]!, v: vs[i]! })),
    rateLevers: byAbs(
      evaluator.leverRates.map((slot, k) => ({ rateId: compiled.rateIds[slot]!, name: compiled.rateNames[slot]!, elasticity: res[k]!, elasticityAtValue: at.rateElasticity[k]!, ...rateStability[k]! })),
    ),
    entryLevers: byAbs(
      evaluator.cells.map(([i, j], k) => ({
        from: doc.stages[j]!.id,
        to: doc.stages[i]!.id,
        fromName: doc.stages[j]!.name,
        toName: doc.stages[i]!.name,
        elasticity: ees[k]!,
        elasticityAtValue: at.entryElasticity[k]!,
        ...entryStability[k]!,
      })),
    ),
    uncertainRates: model.rates.map((r) => ({ rateId: r.rateId, name: r.name, source: r.source, mean: r.mean, sd: r.sd, lower: r.lower, upper: r.upper })),
    issues: model.issues,
  };
}
