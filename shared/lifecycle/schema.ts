/**
 * The Stagewright life-cycle document: Stagewright's own JSON format for one
 * model (stages, named vital rates, arrows). It is versioned by the
 * `stagewright` field; `upgrade.ts` brings older documents up to date.
 *
 * Example (version 2):
 *
 * ```json
 * {
 *   "stagewright": 2,
 *   "name": "Hillside population",
 *   "census": "pre-breeding",
 *   "timeStepUnit": "year",
 *   "stages": [
 *     { "id": "st_juv", "name": "Juvenile", "position": { "x": 0, "y": 0 } },
 *     { "id": "st_adu", "name": "Adult", "position": { "x": 200, "y": 0 }, "color": "#2f6b5a" }
 *   ],
 *   "rates": [
 *     { "id": "vr_sj", "name": "s_j", "value": 0.4, "scale": "probability", "counts": { "k": 40, "n": 100 }, "source": "Field data 2019–2023" },
 *     { "id": "vr_sa", "name": "s_a", "value": 0.8, "ci": { "lower": 0.72, "upper": 0.86, "level": 0.95 } },
 *     { "id": "vr_m", "name": "m", "value": 1.5, "unit": "female offspring per female" }
 *   ],
 *   "transitions": [
 *     { "id": "tr_1", "from": "st_juv", "to": "st_adu", "kind": "growth", "rate": "s_j" },
 *     { "id": "tr_2", "from": "st_adu", "to": "st_adu", "kind": "stasis", "rate": "s_a" },
 *     { "id": "tr_3", "from": "st_adu", "to": "st_juv", "kind": "reproduction", "rate": "s_j * m" }
 *   ]
 * }
 * ```
 *
 * An arrow from stage j to stage i is the matrix entry a_ij (row i, column j);
 * reproduction arrows form F, all other kinds U, and A = U + F.
 *
 * Version 2 added optional fields only: a rate's `scale`, `datasetId`,
 * `counts`, `distribution` and `thermal`; the document's `correlations`,
 * `scenarios` and `climate` (see uncertainty.ts, scenarios.ts, thermal.ts).
 */
import { z } from "zod";
import { checkFormula, MAX_FORMULA_LENGTH, MAX_RATE_NAME_LENGTH, rateNameProblem } from "./formula";
import { ID_PATTERN } from "./ids";
import { checkScenarioRules, MAX_SCENARIOS, ScenarioSchema } from "./scenarios";
import { checkThermalRules, ClimateSettingsSchema, ThermalResponseSchema } from "./thermal";
import { checkUncertaintyRules, RateCorrelationSchema, RateCountsSchema, RateDistributionSchema } from "./uncertainty";

/** The document format this build writes; older versions are upgraded on read. */
export const LIFE_CYCLE_SCHEMA_VERSION = 2;

export const MAX_STAGES = 500;
export const MAX_RATES = 1000;
/** Enough for a dense 300-stage matrix split into survival and reproduction arrows. */
export const MAX_TRANSITIONS = 100_000;
/** Life-cycle and stage names (characters, after trimming). */
export const MAX_NAME_LENGTH = 200;
export const MAX_NOTES_LENGTH = 10_000;
export const MAX_SOURCE_LENGTH = 2_000;
/** Time-step unit and rate unit (characters). */
export const MAX_UNIT_LENGTH = 40;
/** Diagram coordinates lie within ±MAX_COORDINATE. */
export const MAX_COORDINATE = 1_000_000;
export { MAX_FORMULA_LENGTH, MAX_RATE_NAME_LENGTH };

export const CENSUS_TIMINGS = ["pre-breeding", "post-breeding"] as const;
export const TRANSITION_KINDS = ["growth", "stasis", "shrinkage", "reproduction"] as const;
/** The range a vital rate may take: a probability in [0, 1], a non-negative rate, or any number. */
export const RATE_SCALES = ["probability", "non-negative", "unbounded"] as const;
/** Most sampling correlations between rates. */
export const MAX_CORRELATIONS = 5_000;

const IdSchema = z.string({ error: "An id is text." }).regex(ID_PATTERN, "An id is 1 to 64 letters, digits, _ or -.");

const nameSchema = (what: string) =>
  z
    .string({ error: `The ${what} name is text.` })
    .trim()
    .min(1, `Give the ${what} a name.`)
    .max(MAX_NAME_LENGTH, `A ${what} name has at most ${MAX_NAME_LENGTH} characters.`);

const NotesSchema = z.string().max(MAX_NOTES_LENGTH, `Notes have at most ${MAX_NOTES_LENGTH} characters.`).optional();

const CoordinateSchema = z
  .number({ error: "A coordinate is a finite number." })
  .min(-MAX_COORDINATE, `Coordinates lie within ±${MAX_COORDINATE}.`)
  .max(MAX_COORDINATE, `Coordinates lie within ±${MAX_COORDINATE}.`);

export const CensusSchema = z.enum(CENSUS_TIMINGS, { error: 'The census is "pre-breeding" or "post-breeding".' });
export const TransitionKindSchema = z.enum(TRANSITION_KINDS, { error: 'The kind is "growth", "stasis", "shrinkage" or "reproduction".' });

export const StageSchema = z.strictObject({
  id: IdSchema,
  name: nameSchema("stage"),
  /** Display colour, "#rrggbb". */
  color: z.string().regex(/^#[0-9a-fA-F]{6}$/, 'A colour is written "#rrggbb".').optional(),
  /** Diagram position (canvas units). */
  position: z.strictObject({ x: CoordinateSchema, y: CoordinateSchema }),
  notes: NotesSchema,
});

/** Confidence interval of a vital rate; `level` is a proportion, e.g. 0.95. */
export const ConfidenceIntervalSchema = z
  .strictObject({
    lower: z.number({ error: "The lower bound is a finite number." }),
    upper: z.number({ error: "The upper bound is a finite number." }),
    level: z
      .number({ error: "The level is a number such as 0.95." })
      .gt(0, "The confidence level is a proportion between 0 and 1, e.g. 0.95.")
      .lt(1, "The confidence level is a proportion between 0 and 1, e.g. 0.95."),
  })
  .refine((ci) => ci.lower <= ci.upper, { path: ["upper"], message: "The upper bound is below the lower bound." });

export const VitalRateSchema = z.strictObject({
  id: IdSchema,
  /** The name formulas use: an identifier, not a reserved word, unique in the document. */
  name: z.string({ error: "A vital-rate name is text." }).superRefine((name, ctx) => {
    const problem = rateNameProblem(name);
    if (problem !== null) ctx.addIssue({ code: "custom", message: problem });
  }),
  /** Any finite number: a probability, a fecundity, or a coefficient on some scale. */
  value: z.number({ error: "A vital-rate value is a finite number." }),
  /** Standard error, ≥ 0. */
  se: z.number({ error: "A standard error is a finite number." }).min(0, "A standard error cannot be negative.").optional(),
  ci: ConfidenceIntervalSchema.optional(),
  unit: z.string().max(MAX_UNIT_LENGTH, `A unit has at most ${MAX_UNIT_LENGTH} characters.`).optional(),
  notes: NotesSchema,
  /** Where the value comes from (citation, data set). */
  source: z.string().max(MAX_SOURCE_LENGTH, `A source has at most ${MAX_SOURCE_LENGTH} characters.`).optional(),
  /** The range the rate may take; when absent, rateScale() infers it from the value. */
  scale: z.enum(RATE_SCALES, { error: 'The scale is "probability", "non-negative" or "unbounded".' }).optional(),
  /** The Field-data dataset the value was estimated from. */
  datasetId: z.uuid({ error: "A dataset id is a UUID." }).optional(),
  /** k of n: the binomial data behind a probability. */
  counts: RateCountsSchema.optional(),
  /** An explicit distribution of the value. */
  distribution: RateDistributionSchema.optional(),
  /** How the rate changes with temperature. */
  thermal: ThermalResponseSchema.optional(),
});

export const TransitionSchema = z.strictObject({
  id: IdSchema,
  /** Stage id the arrow leaves (matrix column). */
  from: IdSchema,
  /** Stage id the arrow enters (matrix row). */
  to: IdSchema,
  kind: TransitionKindSchema,
  /** A number ≥ 0 or a formula of vital-rate names (checked against `rates`). */
  rate: z.union([z.number(), z.string()], { error: "A rate is a finite number or a formula (text)." }),
  notes: NotesSchema,
});

const LifeCycleObjectSchema = z.strictObject({
  stagewright: z.literal(LIFE_CYCLE_SCHEMA_VERSION, {
    error: `This build reads Stagewright life-cycle documents of version ${LIFE_CYCLE_SCHEMA_VERSION}; upgrade older documents with upgradeLifeCycle.`,
  }),
  name: nameSchema("life cycle"),
  census: CensusSchema,
  /** The projection interval, e.g. "year". */
  timeStepUnit: z
    .string({ error: 'The time-step unit is text such as "year".' })
    .trim()
    .min(1, 'Give the time-step unit, e.g. "year".')
    .max(MAX_UNIT_LENGTH, `A unit has at most ${MAX_UNIT_LENGTH} characters.`),
  notes: NotesSchema,
  stages: z.array(StageSchema).max(MAX_STAGES, `A life cycle has at most ${MAX_STAGES} stages.`),
  rates: z.array(VitalRateSchema).max(MAX_RATES, `A life cycle has at most ${MAX_RATES} vital rates.`),
  transitions: z.array(TransitionSchema).max(MAX_TRANSITIONS, `A life cycle has at most ${MAX_TRANSITIONS} arrows.`),
  /** Correlations between the sampling errors of rates. */
  correlations: z.array(RateCorrelationSchema).max(MAX_CORRELATIONS, `At most ${MAX_CORRELATIONS} correlations.`).optional(),
  /** Management scenarios (Levers). */
  scenarios: z.array(ScenarioSchema).max(MAX_SCENARIOS, `A life cycle has at most ${MAX_SCENARIOS} scenarios.`).optional(),
  /** Temperature range and warming trajectory (Climate). */
  climate: ClimateSettingsSchema.optional(),
});

type LifeCycleObject = z.infer<typeof LifeCycleObjectSchema>;

/** Rules that span fields; each issue's path names the offending field. */
function checkCrossFieldRules(doc: LifeCycleObject, ctx: z.RefinementCtx): void {
  const issue = (path: (string | number)[], message: string, params?: Record<string, unknown>) =>
    ctx.addIssue({ code: "custom", path, message, ...(params ? { params } : {}) });

  // Ids are unique across the whole document, so a comment anchor is unambiguous.
  const seenIds = new Map<string, string>();
  const claimId = (id: string, where: string, path: (string | number)[]) => {
    const first = seenIds.get(id);
    if (first !== undefined) issue(path, `Duplicate id "${id}": ${first} already uses it.`);
    else seenIds.set(id, where);
  };
  doc.stages.forEach((s, i) => claimId(s.id, `stages.${i}`, ["stages", i, "id"]));
  doc.rates.forEach((r, i) => claimId(r.id, `rates.${i}`, ["rates", i, "id"]));
  doc.transitions.forEach((t, i) => claimId(t.id, `transitions.${i}`, ["transitions", i, "id"]));
  doc.scenarios?.forEach((s, i) => {
    claimId(s.id, `scenarios.${i}`, ["scenarios", i, "id"]);
    s.changes.forEach((c, j) => claimId(c.id, `scenarios.${i}.changes.${j}`, ["scenarios", i, "changes", j, "id"]));
  });

  const stageById = new Map<string, { name: string }>();
  const stageNames = new Map<string, number>();
  doc.stages.forEach((s, i) => {
    if (!stageById.has(s.id)) stageById.set(s.id, s);
    const other = stageNames.get(s.name);
    if (other !== undefined) issue(["stages", i, "name"], `Two stages are named "${s.name}" (stages.${other} and stages.${i}); stage names must differ.`);
    else stageNames.set(s.name, i);
  });

  const rateNames = new Map<string, number>();
  doc.rates.forEach((r, i) => {
    const other = rateNames.get(r.name);
    if (other !== undefined) issue(["rates", i, "name"], `Two vital rates are named "${r.name}" (rates.${other} and rates.${i}); formulas need unique names.`);
    else rateNames.set(r.name, i);
  });
  const knownRates = new Set(rateNames.keys());

  const label = (id: string) => {
    const s = stageById.get(id);
    return s ? `"${s.name}"` : `"${id}"`;
  };
  const arrows = new Map<string, number>(); // from, to, kind -> index
  const survivalArrows = new Map<string, number>(); // from, to -> index of growth/shrinkage
  doc.transitions.forEach((t, i) => {
    const at = (field: string) => ["transitions", i, field];
    const fromOk = stageById.has(t.from);
    const toOk = stageById.has(t.to);
    if (!fromOk) issue(at("from"), `No stage has the id "${t.from}".`);
    if (!toOk) issue(at("to"), `No stage has the id "${t.to}".`);

    if (t.kind === "stasis" && t.from !== t.to) {
      issue(at("kind"), `A stasis arrow stays in its stage, but this one goes from ${label(t.from)} to ${label(t.to)}; use growth or shrinkage.`);
    }
    if ((t.kind === "growth" || t.kind === "shrinkage") && t.from === t.to) {
      issue(at("kind"), `A ${t.kind} arrow cannot return to its own stage (${label(t.from)}); a self-loop is stasis or reproduction.`);
    }

    const key = `${t.from}\u0000${t.to}\u0000${t.kind}`;
    const twin = arrows.get(key);
    if (twin !== undefined) {
      issue(["transitions", i], `transitions.${twin} is already a ${t.kind} arrow from ${label(t.from)} to ${label(t.to)}; combine them into one.`);
    } else arrows.set(key, i);

    if (t.kind === "growth" || t.kind === "shrinkage") {
      const pair = `${t.from}\u0000${t.to}`;
      const other = survivalArrows.get(pair);
      const otherKind = other === undefined ? undefined : doc.transitions[other]?.kind;
      if (other !== undefined && otherKind !== t.kind) {
        issue(at("kind"), `transitions.${other} already goes from ${label(t.from)} to ${label(t.to)} as ${otherKind}; the move between two stages is either growth or shrinkage, not both.`);
      } else if (other === undefined) survivalArrows.set(pair, i);
    }

    if (typeof t.rate === "number") {
      if (t.rate < 0) issue(at("rate"), `A rate cannot be negative; got ${t.rate}.`);
    } else {
      const check = checkFormula(t.rate, knownRates);
      if (!check.ok) {
        for (const e of check.errors) issue(at("rate"), e.message, { formulaError: e });
      }
    }
  });

  const areaIssue = (path: (string | number)[], message: string) => issue(path, message);
  checkUncertaintyRules(doc, areaIssue);
  checkScenarioRules(doc, areaIssue);
  checkThermalRules(doc, areaIssue);
}

/** A complete, valid life-cycle document (current version). */
export const LifeCycleSchema = LifeCycleObjectSchema.superRefine(checkCrossFieldRules);

export type LifeCycle = z.infer<typeof LifeCycleSchema>;
export type LifeCycleInput = z.input<typeof LifeCycleSchema>;
export type Stage = z.infer<typeof StageSchema>;
export type VitalRate = z.infer<typeof VitalRateSchema>;
export type Transition = z.infer<typeof TransitionSchema>;
export type TransitionKind = z.infer<typeof TransitionKindSchema>;
export type Census = z.infer<typeof CensusSchema>;
export type ConfidenceInterval = z.infer<typeof ConfidenceIntervalSchema>;
export type RateScale = (typeof RATE_SCALES)[number];

/**
 * The range a rate may take: its `scale`, or when absent a guess from its
 * value (0–1 → probability, above 1 → non-negative, below 0 → unbounded).
 * The Rates table shows the result so a user can correct a wrong guess.
 */
export function rateScale(rate: Pick<VitalRate, "value" | "scale">): RateScale {
  if (rate.scale !== undefined) return rate.scale;
  if (rate.value >= 0 && rate.value <= 1) return "probability";
  return rate.value > 1 ? "non-negative" : "unbounded";
}

/** The closed interval of values allowed on a scale. */
export function scaleBounds(scale: RateScale): { lower: number; upper: number } {
  if (scale === "probability") return { lower: 0, upper: 1 };
  if (scale === "non-negative") return { lower: 0, upper: Infinity };
  return { lower: -Infinity, upper: Infinity };
}

export interface EmptyLifeCycleOptions {
  /** Default "pre-breeding". */
  census?: Census;
  /** Default "year". */
  timeStepUnit?: string;
}

/** A valid life cycle with no stages, rates or arrows. Throws ZodError for a bad name. */
export function emptyLifeCycle(name: string, options: EmptyLifeCycleOptions = {}): LifeCycle {
  return LifeCycleSchema.parse({
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name,
    census: options.census ?? "pre-breeding",
    timeStepUnit: options.timeStepUnit ?? "year",
    stages: [],
    rates: [],
    transitions: [],
  });
}
