/**
 * The payload of "start a Risk run": stochastic settings for one life cycle.
 * Checks that need the life-cycle documents (stage counts and ids, rate ids,
 * matrix sizes) happen in buildRiskModel (shared/risk); everything else is
 * here, each problem reported at the path of the field to fix.
 *
 * Units: years are projection intervals of the life cycle; abundances are
 * individuals.
 */
import { z } from "zod";
import { choleskyLower } from "../demography/cholesky";

/** Most replicate futures in one Run. */
export const MAX_REPLICATES = 100_000;
/** Longest horizon (years = projection intervals). */
export const MAX_HORIZON = 1_000;
/**
 * Most work in one Run, in units of replicates × years × stages² (about one
 * multiply-add of a dense projection each). 2e10 units take about 20 s of one
 * worker for matrix selection on the 2-core reference machine (e.g. 10,000
 * replicates × 500 years × 60 stages), a few minutes with a ceiling or
 * demographic stochasticity, and longer with vital-rate draws, whose cost
 * grows with the number of arrows (see shared/risk/plan.ts); the chunk plan
 * spreads it over workers. The benchmark case (10,000 × 100 × 10²) is 1e8.
 */
export const MAX_WORK = 2e10;
/** Most environments (life cycles) in a matrix set or Markov chain. */
export const MAX_ENVIRONMENTS = 50;
/** Most vital rates drawn each year. */
export const MAX_DRAWN_RATES = 200;
/** Most years in the table of quasi-extinction probabilities. */
export const MAX_REPORT_YEARS = 50;
/** Tolerance on probability sums (weights, Markov rows). */
export const PROBABILITY_SUM_TOLERANCE = 1e-9;
export const RATE_DISTRIBUTIONS = ["beta", "lognormal", "gamma"] as const;

const IdSchema = z.string({ error: "An id is text." }).min(1, "An id cannot be empty.").max(64, "An id has at most 64 characters.");
const finite = (what: string) => z.number({ error: `${what} is a finite number.` });
const probability = (what: string) => finite(what).min(0, `${what} is a probability from 0 to 1.`).max(1, `${what} is a probability from 0 to 1.`);
const wholeNumber = (what: string, min: number, max: number) =>
  z
    .number({ error: `${what} is a whole number.` })
    .int(`${what} is a whole number.`)
    .min(min, `${what} is at least ${min}.`)
    .max(max, `${what} is at most ${max.toLocaleString("en")}.`);

const LifeCycleIdsSchema = z
  .array(IdSchema)
  .min(1, "Choose at least one life cycle.")
  .max(MAX_ENVIRONMENTS, `At most ${MAX_ENVIRONMENTS} life cycles.`);

export const MatrixSelectionSchema = z.strictObject({
  kind: z.literal("matrices"),
  /** Life cycles of the Study (same stages in the same order) whose matrices are drawn each year. */
  lifeCycleIds: LifeCycleIdsSchema,
  /** Probability of each life cycle's matrices in any year (Σ = 1). */
  weights: z.array(probability("A weight")),
});

export const MarkovEnvironmentSchema = z.strictObject({
  kind: z.literal("markov"),
  /** One environment state per life cycle. */
  lifeCycleIds: LifeCycleIdsSchema,
  /** transition[i][j] = probability that next year is state j when this year is state i; each row sums to 1. */
  transition: z.array(z.array(probability("A transition probability"))),
  /** The life cycle (state) of the first year. */
  initialState: IdSchema,
});

export const DrawnRateSchema = z.strictObject({
  /** Id of a vital rate of the life cycle. */
  rateId: IdSchema,
  /** beta for probabilities (0–1); lognormal or gamma for positive rates such as fecundities. */
  distribution: z.enum(RATE_DISTRIBUTIONS, { error: 'The distribution is "beta", "lognormal" or "gamma".' }),
  mean: finite("The mean"),
  /** Standard deviation between years (environmental variation, not sampling error). */
  sd: finite("The SD").min(0, "An SD cannot be negative."),
});

export const RateCorrelationSchema = z.strictObject({
  a: IdSchema,
  b: IdSchema,
  /** Correlation of the two rates' normal scores (Gaussian copula). */
  r: finite("A correlation").min(-1, "A correlation lies between −1 and 1.").max(1, "A correlation lies between −1 and 1."),
});

export const VitalRateEnvironmentSchema = z.strictObject({
  kind: z.literal("vital-rates"),
  rates: z.array(DrawnRateSchema).min(1, "Choose at least one vital rate to vary.").max(MAX_DRAWN_RATES, `At most ${MAX_DRAWN_RATES} vital rates.`),
  correlations: z.array(RateCorrelationSchema).optional(),
});

export const EnvironmentSchema = z.discriminatedUnion("kind", [MatrixSelectionSchema, MarkovEnvironmentSchema, VitalRateEnvironmentSchema], {
  error: 'The environment kind is "matrices", "markov" or "vital-rates".',
});

const RiskSettingsObjectSchema = z.strictObject({
  environment: EnvironmentSchema,
  /** Whole individuals with binomial survival and Poisson births (for small populations). */
  demographic: z.boolean({ error: "demographic is true or false." }).default(false),
  /** Largest total abundance (individuals). */
  ceiling: finite("The ceiling").gt(0, "The ceiling is a number of individuals above 0.").optional(),
  /** Individuals per stage in year 0, in the life cycle's stage order. */
  initial: z
    .array(finite("An initial abundance").min(0, "An initial abundance cannot be negative."))
    .min(1, "Give the initial abundance of every stage."),
  /** Years (projection intervals) to simulate. */
  horizon: wholeNumber("The horizon", 1, MAX_HORIZON),
  replicates: wholeNumber("The number of replicates", 1, MAX_REPLICATES),
  /** Quasi-extinct when the abundance of `stages` (all stages when absent) is at or below `value`. */
  threshold: z.strictObject({
    value: finite("The threshold").min(0, "The threshold cannot be negative."),
    stages: z.array(IdSchema).min(1, "Choose at least one stage, or leave stages out for the total.").optional(),
  }),
  /** Years for the table of quasi-extinction probabilities. */
  horizons: z.array(wholeNumber("A reporting year", 1, MAX_HORIZON)).max(MAX_REPORT_YEARS, `At most ${MAX_REPORT_YEARS} reporting years.`).optional(),
  /** Seed of the random streams; the service picks and stores one when absent. */
  seed: wholeNumber("The seed", 0, Number.MAX_SAFE_INTEGER).optional(),
  /**
   * Run the life cycle as changed by this Levers scenario (its id in the
   * document's `scenarios`); the vital-rate means drawn each year move with
   * the scenario's rate changes. Absent: the life cycle as it is.
   */
  scenarioId: IdSchema.optional(),
  /** Years discarded before estimating the stochastic growth rate (default from the damping ratio). */
  burnIn: wholeNumber("The burn-in", 0, MAX_HORIZON).optional(),
});

type RiskSettingsObject = z.infer<typeof RiskSettingsObjectSchema>;

function fmt(x: number): string {
  return Number.isInteger(x) ? String(x) : x.toPrecision(6).replace(/\.?0+$/, "");
}

function checkSum(values: readonly number[], ctx: z.RefinementCtx, path: (string | number)[], what: string): void {
  const sum = values.reduce((s, v) => s + v, 0);
  if (Math.abs(sum - 1) > PROBABILITY_SUM_TOLERANCE) ctx.addIssue({ code: "custom", path, message: `${what} must sum to 1; they sum to ${fmt(sum)}.` });
}

function checkUnique(ids: readonly string[], ctx: z.RefinementCtx, path: (string | number)[], what: string): void {
  const seen = new Map<string, number>();
  ids.forEach((id, i) => {
    const first = seen.get(id);
    if (first !== undefined) ctx.addIssue({ code: "custom", path: [...path, i], message: `${what} "${id}" is listed twice (entries ${first + 1} and ${i + 1}).` });
    else seen.set(id, i);
  });
}

function checkEnvironment(env: RiskSettingsObject["environment"], ctx: z.RefinementCtx): void {
  const at = (...path: (string | number)[]) => ["environment", ...path];
  if (env.kind === "matrices" || env.kind === "markov") {
    checkUnique(env.lifeCycleIds, ctx, at("lifeCycleIds"), "Life cycle");
  }
  if (env.kind === "matrices") {
    if (env.weights.length !== env.lifeCycleIds.length) {
      ctx.addIssue({ code: "custom", path: at("weights"), message: `Give one weight per life cycle: ${env.lifeCycleIds.length} life cycles, ${env.weights.length} weights.` });
    } else checkSum(env.weights, ctx, at("weights"), "The weights");
  } else if (env.kind === "markov") {
    const K = env.lifeCycleIds.length;
    if (env.transition.length !== K) {
      ctx.addIssue({ code: "custom", path: at("transition"), message: `The transition matrix needs one row per environment state: ${K} rows, got ${env.transition.length}.` });
    } else {
      env.transition.forEach((row, i) => {
        if (row.length !== K) ctx.addIssue({ code: "custom", path: at("transition", i), message: `Row ${i + 1} of the transition matrix needs ${K} entries, got ${row.length}.` });
        else checkSum(row, ctx, at("transition", i), `The probabilities of leaving state ${i + 1} (row ${i + 1})`);
      });
    }
    if (!env.lifeCycleIds.includes(env.initialState)) {
      ctx.addIssue({ code: "custom", path: at("initialState"), message: `The initial state "${env.initialState}" is not one of the chosen life cycles.` });
    }
  } else {
    checkUnique(
      env.rates.map((r) => r.rateId),
      ctx,
      at("rates"),
      "Vital rate",
    );
    env.rates.forEach((r, i) => {
      const path = at("rates", i);
      if (r.distribution === "beta") {
        if (r.mean < 0 || r.mean > 1) {
          ctx.addIssue({ code: "custom", path: [...path, "mean"], message: `A beta distribution describes a probability: its mean lies from 0 to 1, got ${fmt(r.mean)}.` });
        } else if (r.sd > 0) {
          const limit = Math.sqrt(r.mean * (1 - r.mean));
          if (r.sd * r.sd >= r.mean * (1 - r.mean)) {
            ctx.addIssue({
              code: "custom",
              path: [...path, "sd"],
              message:
                r.mean === 0 || r.mean === 1
                  ? `A probability with mean ${fmt(r.mean)} cannot vary: set the SD to 0 or move the mean inside (0, 1).`
                  : `For a beta distribution with mean ${fmt(r.mean)} the SD must be below √(mean·(1 − mean)) = ${fmt(limit)}; got ${fmt(r.sd)}.`,
            });
          }
        }
      } else if (r.mean < 0 || (r.mean === 0 && r.sd > 0)) {
        ctx.addIssue({ code: "custom", path: [...path, "mean"], message: `A ${r.distribution} distribution describes a positive rate: its mean must be above 0 (or 0 with SD 0), got ${fmt(r.mean)}.` });
      }
    });
    const correlations = env.correlations ?? [];
    if (correlations.length === 0) return;
    const index = new Map(env.rates.map((r, i) => [r.rateId, i]));
    const seen = new Map<string, number>();
    let usable = true;
    correlations.forEach((c, k) => {
      const path = at("correlations", k);
      const ia = index.get(c.a);
      const ib = index.get(c.b);
      if (ia === undefined) ctx.addIssue({ code: "custom", path: [...path, "a"], message: `"${c.a}" is not one of the vital rates being varied.` });
      if (ib === undefined) ctx.addIssue({ code: "custom", path: [...path, "b"], message: `"${c.b}" is not one of the vital rates being varied.` });
      if (ia === undefined || ib === undefined) {
        usable = false;
        return;
      }
      if (ia === ib) {
        ctx.addIssue({ code: "custom", path: [...path, "b"], message: "A rate's correlation with itself is 1; name two different rates." });
        usable = false;
        return;
      }
      const key = ia < ib ? `${ia} ${ib}` : `${ib} ${ia}`;
      const first = seen.get(key);
      if (first !== undefined) {
        ctx.addIssue({ code: "custom", path, message: `The correlation of "${c.a}" and "${c.b}" is already given in entry ${first + 1}.` });
        usable = false;
      } else seen.set(key, k);
    });
    if (usable) {
      const R = correlationMatrix(env.rates.length, correlations, index);
      const chol = choleskyLower(R);
      if (!chol.ok) {
        ctx.addIssue({
          code: "custom",
          path: at("correlations"),
          message: `These correlations are not mutually consistent (the correlation matrix is not positive definite; the check fails at "${env.rates[chol.row]!.rateId}"). Correlations of ±1 or three or more strong correlations with incompatible signs cause this: weaken some of them.`,
        });
      }
    }
  }
}

/** Correlation matrix of the drawn rates (identity where no pair is given), in `rates` order. */
export function correlationMatrix(count: number, correlations: readonly { a: string; b: string; r: number }[], index: ReadonlyMap<string, number>): number[][] {
  const R: number[][] = Array.from({ length: count }, (_, i) => Array.from({ length: count }, (_, j) => (i === j ? 1 : 0)));
  for (const c of correlations) {
    const i = index.get(c.a);
    const j = index.get(c.b);
    if (i === undefined || j === undefined) continue;
    R[i]![j] = c.r;
    R[j]![i] = c.r;
  }
  return R;
}

function checkSettings(s: RiskSettingsObject, ctx: z.RefinementCtx): void {
  checkEnvironment(s.environment, ctx);
  const total = s.initial.reduce((a, b) => a + b, 0);
  if (!(total > 0)) ctx.addIssue({ code: "custom", path: ["initial"], message: "The initial population is all zeros: give at least one individual." });
  if (s.demographic) {
    s.initial.forEach((x, i) => {
      if (!Number.isInteger(x)) ctx.addIssue({ code: "custom", path: ["initial", i], message: `With demographic stochasticity every stage holds whole individuals; got ${fmt(x)}.` });
    });
  }
  if (s.threshold.stages === undefined && total > 0 && total <= s.threshold.value) {
    ctx.addIssue({ code: "custom", path: ["threshold", "value"], message: `The initial population (${fmt(total)}) is already at or below the threshold (${fmt(s.threshold.value)}).` });
  }
  if (s.threshold.stages) checkUnique(s.threshold.stages, ctx, ["threshold", "stages"], "Stage");
  if (s.ceiling !== undefined && s.ceiling <= s.threshold.value) {
    ctx.addIssue({ code: "custom", path: ["ceiling"], message: `The ceiling (${fmt(s.ceiling)}) must be above the quasi-extinction threshold (${fmt(s.threshold.value)}).` });
  }
  s.horizons?.forEach((y, i) => {
    if (y > s.horizon) ctx.addIssue({ code: "custom", path: ["horizons", i], message: `Year ${y} is beyond the ${s.horizon}-year horizon.` });
  });
  if (s.burnIn !== undefined && s.burnIn >= s.horizon) {
    ctx.addIssue({ code: "custom", path: ["burnIn"], message: `The burn-in (${s.burnIn} years) must be shorter than the horizon (${s.horizon} years).` });
  }
  const work = riskWork(s);
  if (work > MAX_WORK) {
    ctx.addIssue({
      code: "custom",
      path: ["replicates"],
      message: `This Run is too large: ${s.replicates.toLocaleString("en")} replicates × ${s.horizon} years × ${s.initial.length}² stages = ${work.toExponential(2)} work units, above the limit of ${MAX_WORK.toExponential(0)}. Use fewer replicates or a shorter horizon.`,
    });
  }
}

/** Work units of a Run: replicates × years × stages² (stages = initial.length). */
export function riskWork(s: { replicates: number; horizon: number; initial: readonly unknown[] }): number {
  return s.replicates * s.horizon * s.initial.length * s.initial.length;
}

/** Settings of a Risk run (the body of "start a Risk run"). */
export const RiskSettingsSchema = RiskSettingsObjectSchema.superRefine(checkSettings);

export type RiskSettings = z.infer<typeof RiskSettingsSchema>;
export type RiskSettingsInput = z.input<typeof RiskSettingsSchema>;
export type RiskEnvironment = z.infer<typeof EnvironmentSchema>;
export type DrawnRate = z.infer<typeof DrawnRateSchema>;
export type RateCorrelation = z.infer<typeof RateCorrelationSchema>;
