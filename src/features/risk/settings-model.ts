/**
 * The Risk settings form's values and their translation to and from the
 * payload (RiskSettingsSchema in shared/schemas/risk.ts).
 *
 * The form keeps what a person types as text, and keeps the choices of every
 * kind of environment while another kind is shown. Vital rates and life
 * cycles are keyed by id (behind a "_" so an id made of digits is never read
 * as an array index). The payload is built on submit, checked with the shared
 * schema, and every problem — found here or by the server — is put back
 * under the input that caused it through `fieldOfSettingsPath`.
 */
import type { LifeCycle } from "../../../shared/lifecycle";
import type { RATE_DISTRIBUTIONS, RiskSettings, RiskSettingsInput } from "../../../shared/schemas/risk";
import { parseNumberInput } from "../../lib/number-input";

export type EnvironmentKind = "vital-rates" | "matrices" | "markov";
export type RateDistribution = (typeof RATE_DISTRIBUTIONS)[number];

export interface DrawnRateValues {
  use: boolean;
  distribution: RateDistribution;
  mean: string;
  sd: string;
}

export interface CorrelationValues {
  a: string;
  b: string;
  r: string;
}

export interface RiskFormValues {
  kind: EnvironmentKind;
  /** By `key(rateId)`. */
  rates: Record<string, DrawnRateValues>;
  correlations: CorrelationValues[];
  /** By `key(lifeCycleId)`: used in the matrix set, and its weight. */
  matrices: Record<string, { use: boolean; weight: string }>;
  /** By `key(lifeCycleId)`: a state of the Markov chain, and its row of the transition matrix by `key(lifeCycleId)`. */
  markov: Record<string, { use: boolean; row: Record<string, string> }>;
  /** Life-cycle id of the first year's state. */
  markovInitial: string;
  demographic: boolean;
  ceilingOn: boolean;
  ceiling: string;
  /** The total the person types; the stages' numbers follow it through the stable stage distribution. */
  total: string;
  /** Individuals per stage, in stage order. */
  initial: string[];
  horizon: string;
  replicates: string;
  thresholdValue: string;
  thresholdOn: "total" | "stages";
  /** Stage ids. */
  thresholdStages: string[];
  /** "10, 20, 50": years of the table (blank: the server's choice). */
  reportYears: string;
  seed: string;
  burnIn: string;
  /** Id of the Levers scenario the Run applies to the life cycle; "" for the life cycle as it is. */
  scenarioId: string;
}

/** Everything the translation needs besides the values. */
export interface FormContext {
  /** Life cycles of the Study that can be environments (same stage count), in list order. */
  candidates: readonly string[];
  /** Vital-rate ids of the life cycle, in document order. */
  rateIds: readonly string[];
}

/** Form key of an id. */
export const key = (id: string) => `_${id}`;

export const DEFAULT_TOTAL = 100;
const DEFAULT_HORIZON = 100;
const DEFAULT_REPLICATES = 1000;
const DEFAULT_THRESHOLD = 10;
/** Default SD between years, as a share of the mean. */
export const DEFAULT_CV = 0.1;

const numberText = (x: number) => String(Number(x.toPrecision(6)));

/** beta for a rate that is a probability; lognormal for one that only feeds reproduction arrows or exceeds 1. */
export function defaultDistribution(doc: LifeCycle, rateId: string): RateDistribution {
  const rate = doc.rates.find((r) => r.id === rateId);
  if (!rate) return "beta";
  if (rate.value < 0 || rate.value > 1) return "lognormal";
  const word = new RegExp(`(^|[^A-Za-z0-9_])${rate.name.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}($|[^A-Za-z0-9_])`);
  const uses = doc.transitions.filter((t) => typeof t.rate === "string" && word.test(t.rate));
  return uses.length > 0 && uses.every((t) => t.kind === "reproduction") ? "lognormal" : "beta";
}

export function defaultRate(doc: LifeCycle, rateId: string): DrawnRateValues {
  const value = doc.rates.find((r) => r.id === rateId)?.value ?? 0;
  return { use: false, distribution: defaultDistribution(doc, rateId), mean: numberText(value), sd: numberText(Math.abs(value) * DEFAULT_CV) };
}

/**
 * Whole individuals per stage summing to `total`: the stable stage
 * distribution scaled and rounded by largest remainders.
 */
export function spreadTotal(total: number, shares: readonly number[]): number[] {
  const sum = shares.reduce((s, w) => s + Math.max(0, w), 0);
  if (!(sum > 0) || !(total >= 0)) return shares.map(() => 0);
  const exact = shares.map((w) => (Math.max(0, w) / sum) * total);
  const out = exact.map(Math.floor);
  let left = Math.round(total) - out.reduce((s, v) => s + v, 0);
  const order = exact.map((x, i) => ({ i, r: x - Math.floor(x) })).sort((a, b) => b.r - a.r || a.i - b.i);
  for (let k = 0; left > 0 && order.length > 0; k = (k + 1) % order.length, left--) out[order[k]!.i]! += 1;
  return out;
}

export function defaultValues(doc: LifeCycle, stableStage: readonly number[] | null, lifeCycleId: string): RiskFormValues {
  const spread = stableStage && stableStage.length === doc.stages.length ? spreadTotal(DEFAULT_TOTAL, stableStage) : null;
  return {
    kind: "vital-rates",
    rates: Object.fromEntries(doc.rates.map((r) => [key(r.id), defaultRate(doc, r.id)])),
    correlations: [],
    matrices: {},
    markov: {},
    markovInitial: lifeCycleId,
    demographic: false,
    ceilingOn: false,
    ceiling: "",
    total: String(DEFAULT_TOTAL),
    initial: doc.stages.map((_, i) => (spread ? String(spread[i]) : "")),
    horizon: String(DEFAULT_HORIZON),
    replicates: String(DEFAULT_REPLICATES),
    thresholdValue: String(DEFAULT_THRESHOLD),
    thresholdOn: "total",
    thresholdStages: [],
    reportYears: "",
    seed: "",
    burnIn: "",
    scenarioId: "",
  };
}

/** A number typed as text: undefined when blank (the schema then says what is missing), NaN when unreadable. */
function num(text: string | undefined): number | undefined {
  if (text === undefined || text.trim() === "") return undefined;
  return parseNumberInput(text) ?? Number.NaN;
}

/** Like `num`, but a blank means 0 (an empty stage, a zero probability). */
const numOrZero = (text: string | undefined) => num(text) ?? 0;

/** Life cycles chosen for a matrix set or a Markov chain, in the Study's list order. */
export function chosen(values: RiskFormValues, context: FormContext): string[] {
  if (values.kind === "matrices") return context.candidates.filter((id) => values.matrices[key(id)]?.use);
  if (values.kind === "markov") return context.candidates.filter((id) => values.markov[key(id)]?.use);
  return [];
}

/** Vital rates chosen to vary, in document order. */
export const chosenRates = (values: RiskFormValues, context: FormContext) => context.rateIds.filter((id) => values.rates[key(id)]?.use);

/** The payload for the form's values (not yet checked: the schema does that). */
export function toSettings(values: RiskFormValues, context: FormContext): RiskSettingsInput {
  let environment: RiskSettingsInput["environment"];
  const ids = chosen(values, context);
  if (values.kind === "matrices") {
    environment = { kind: "matrices", lifeCycleIds: ids, weights: ids.map((id) => numOrZero(values.matrices[key(id)]?.weight)) };
  } else if (values.kind === "markov") {
    environment = {
      kind: "markov",
      lifeCycleIds: ids,
      transition: ids.map((from) => ids.map((to) => numOrZero(values.markov[key(from)]?.row[key(to)]))),
      initialState: values.markovInitial,
    };
  } else {
    const rateIds = chosenRates(values, context);
    const correlations = values.correlations.map((c) => ({ a: c.a, b: c.b, r: num(c.r) as number }));
    environment = {
      kind: "vital-rates",
      rates: rateIds.map((id) => {
        const r = values.rates[key(id)]!;
        return { rateId: id, distribution: r.distribution, mean: num(r.mean) as number, sd: num(r.sd) as number };
      }),
      ...(correlations.length > 0 ? { correlations } : {}),
    };
  }
  const reportYears = values.reportYears
    .split(/[\s,;]+/)
    .filter((t) => t !== "")
    .map((t) => num(t) as number);
  const optional = (name: "ceiling" | "seed" | "burnIn", text: string) => {
    const v = num(text);
    return v === undefined ? {} : { [name]: v };
  };
  return {
    environment,
    demographic: values.demographic,
    // A ticked ceiling left blank is a problem to report, not a silent "no ceiling".
    ...(values.ceilingOn ? { ceiling: num(values.ceiling) ?? Number.NaN } : {}),
    initial: values.initial.map((t) => numOrZero(t)),
    horizon: num(values.horizon) as number,
    replicates: num(values.replicates) as number,
    threshold: {
      value: num(values.thresholdValue) as number,
      ...(values.thresholdOn === "stages" ? { stages: values.thresholdStages } : {}),
    },
    ...(reportYears.length > 0 ? { horizons: reportYears } : {}),
    ...optional("seed", values.seed),
    ...optional("burnIn", values.burnIn),
    // A draft kept from before the field existed has none.
    ...(values.scenarioId ? { scenarioId: values.scenarioId } : {}),
  };
}

/**
 * The form field that shows a problem the schema or the server reported at
 * a settings path ("environment.rates.1.sd", with or without the server's
 * "settings." prefix); null when no input matches (it is shown above the
 * Start button instead).
 */
export function fieldOfSettingsPath(path: string, values: RiskFormValues, context: FormContext): string | null {
  const parts = path.replace(/^settings\.?/, "").split(".").filter((p) => p !== "");
  const [head, ...rest] = parts;
  const index = (p: string | undefined) => (p !== undefined && /^\d+$/.test(p) ? Number(p) : null);
  switch (head) {
    case undefined:
    case "(body)":
      return null;
    case "environment": {
      const [what, a, b] = rest;
      const i = index(a);
      if (what === "rates") {
        if (i === null) return "ratesList";
        const id = chosenRates(values, context)[i];
        if (id === undefined) return "ratesList";
        return `rates.${key(id)}.${b === "mean" || b === "sd" || b === "distribution" ? b : "use"}`;
      }
      if (what === "correlations") {
        if (i === null) return "correlationsList";
        return b === "a" || b === "b" || b === "r" ? `correlations.${i}.${b}` : `correlations.${i}.r`;
      }
      const ids = chosen(values, context);
      const list = values.kind === "markov" ? "markovList" : "matricesList";
      if (what === "lifeCycleIds") {
        const id = i === null ? undefined : ids[i];
        return id === undefined ? list : values.kind === "markov" ? `markov.${key(id)}.use` : `matrices.${key(id)}.use`;
      }
      if (what === "weights") {
        const id = i === null ? undefined : ids[i];
        return id === undefined ? list : `matrices.${key(id)}.weight`;
      }
      if (what === "transition") {
        const from = i === null ? undefined : ids[i];
        const j = index(b);
        const to = j === null ? undefined : ids[j];
        if (from === undefined) return list;
        if (to === undefined) return `markovRows.${key(from)}`;
        return `markov.${key(from)}.row.${key(to)}`;
      }
      if (what === "initialState") return "markovInitial";
      return list;
    }
    case "initial": {
      const i = index(rest[0]);
      return i === null ? "initialList" : `initial.${i}`;
    }
    case "threshold":
      return rest[0] === "stages" ? "thresholdStagesList" : "thresholdValue";
    case "horizons":
      return "reportYears";
    case "demographic":
    case "ceiling":
    case "horizon":
    case "replicates":
    case "seed":
    case "burnIn":
    case "scenarioId":
      return head;
    default:
      return null;
  }
}

// ------------------------------------------------------- settings → form values

const text = (x: unknown) => (typeof x === "number" && Number.isFinite(x) ? String(x) : "");

/**
 * The form values of an earlier Run's settings, over `base` (the defaults for
 * the current document), so a Run can be repeated with a change.
 */
export function fromSettings(settings: RiskSettings, base: RiskFormValues, doc: LifeCycle): RiskFormValues {
  const out: RiskFormValues = structuredClone(base);
  const env = settings.environment;
  out.kind = env.kind;
  if (env.kind === "vital-rates") {
    for (const k of Object.keys(out.rates)) out.rates[k] = { ...out.rates[k]!, use: false };
    for (const r of env.rates) out.rates[key(r.rateId)] = { use: true, distribution: r.distribution, mean: text(r.mean), sd: text(r.sd) };
    out.correlations = (env.correlations ?? []).map((c) => ({ a: c.a, b: c.b, r: text(c.r) }));
  } else if (env.kind === "matrices") {
    out.matrices = Object.fromEntries(env.lifeCycleIds.map((id, k) => [key(id), { use: true, weight: text(env.weights[k]) }]));
  } else {
    out.markov = Object.fromEntries(
      env.lifeCycleIds.map((from, i) => [key(from), { use: true, row: Object.fromEntries(env.lifeCycleIds.map((to, j) => [key(to), text(env.transition[i]?.[j])])) }]),
    );
    out.markovInitial = env.initialState;
  }
  out.demographic = settings.demographic;
  out.ceilingOn = settings.ceiling !== undefined;
  out.ceiling = text(settings.ceiling);
  if (settings.initial.length === doc.stages.length) {
    out.initial = settings.initial.map(text);
    out.total = text(settings.initial.reduce((s, v) => s + v, 0));
  }
  out.horizon = text(settings.horizon);
  out.replicates = text(settings.replicates);
  out.thresholdValue = text(settings.threshold.value);
  out.thresholdOn = settings.threshold.stages ? "stages" : "total";
  out.thresholdStages = settings.threshold.stages ?? [];
  out.reportYears = (settings.horizons ?? []).join(", ");
  out.seed = text(settings.seed);
  out.burnIn = text(settings.burnIn);
  // A Run made for a scenario (from Levers, or from this form) is repeated for the same scenario.
  out.scenarioId = settings.scenarioId ?? "";
  return out;
}
