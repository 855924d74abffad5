/**
 * What a life cycle's report holds: one object, built by the server, shown by
 * the report page and drawn into the PDF, so the page and the PDF cannot say
 * different things.
 */
import type { DefaultBasis } from "../climate";
import type { Verdict } from "../format/verdict";
import type { LifeCycle } from "../lifecycle";
import type { ThermalForm } from "../lifecycle/thermal";
import type { ScenarioComparison } from "../levers";
import type { LifeCycleAnalysis, SnapshotSummary } from "../schemas/life-cycles";
import type { ReviewStatus, ReviewView } from "../schemas/review";

/** DESIGN.md §3: shown on Risk, Levers and every report. */
export const REPORT_CAUTIONS: readonly string[] = [
  "Results support and do not replace expert judgement.",
  "Status listings and management decisions follow the rules of the responsible authority and peer review.",
  "Models are only as good as their data.",
];

export type ReportSource =
  | { kind: "snapshot"; id: string; number: number; message: string; createdAt: string; authorName: string | null }
  | {
      kind: "current";
      version: number;
      savedAt: string;
      /** The newest snapshot, and whether the saved state is still exactly it. */
      latestSnapshot: { id: string; number: number; createdAt: string; sameAsNow: boolean } | null;
    };

export interface ReportRisk {
  runId: string;
  finishedAt: string | null;
  timeStepUnit: string;
  horizon: number;
  replicates: number;
  thresholdRule: string;
  /** Probability of quasi-extinction within the horizon, with its 95 % band. */
  probability: number;
  lower: number;
  upper: number;
  lambdaS: number | null;
  lambdaSLower: number | null;
  lambdaSUpper: number | null;
  medianTime: number | null;
  finalMean: number;
  /** IUCN criterion E: the most severe category whose threshold is met, or null; the caution that goes with it. */
  criterionE: { highestMet: string | null; lines: string[]; caution: string };
}

/** The newest finished Monte Carlo uncertainty Run: λ's percentile interval from the rates' uncertainty. */
export interface ReportLambdaRun {
  runId: string;
  finishedAt: string | null;
  draws: number;
  /** Interval level, e.g. 0.95. */
  level: number;
  lower: number;
  median: number;
  upper: number;
  probabilityBelowOne: number;
  /** The life cycle's version the Run drew from, and whether the reported state is still that version. */
  lifeCycleVersion: number;
  sameAsReported: boolean;
}

/** Levers: the document's scenarios side by side, and the strongest single levers. */
export interface ReportLevers {
  /** null when the life cycle has no scenarios. */
  comparison: ScenarioComparison | null;
  /** The same relative change applied to every lever (0.1 = ±10 %). */
  relativeChange: number;
  /** The levers that move λ most when raised by `relativeChange`, strongest first (at most 8). */
  topLevers: { label: string; value: number; elasticity: number; deltaUp: number | null; deltaDown: number | null }[];
  /** Why there are no levers (the model cannot be changed or analysed). */
  problem: string | null;
}

/** One vital rate's thermal response as the report lists it. */
export interface ReportThermalResponse {
  rateName: string;
  /** The rate's own notes (what it is), and the source note of its value. */
  rateNotes: string | null;
  rateSource: string | null;
  form: ThermalForm;
  formLabel: string;
  formula: string;
  appliesTo: "rate" | "hazard";
  /** Parameters in the Climate tab's order; `basis` says when a value is one of the tab's defaults. */
  parameters: { key: string; label: string; value: number; unit: string; basis: DefaultBasis | null; note: string | null }[];
  /** The response's own optimum by its form's formula, °C (null for Boltzmann–Arrhenius). */
  optimum: number | null;
}

/** The newest finished warming Run of the life cycle, summarised. */
export interface ReportWarming {
  runId: string;
  finishedAt: string | null;
  /** The trajectory in words. */
  trajectory: string;
  firstYear: number;
  lastYear: number;
  replicates: number;
  seed: number;
  /** Year-to-year SD of the temperatures, °C. */
  sd: number;
  initialTotal: number | null;
  timeStepUnit: string;
  /** The first year whose λ_t < 1 along the trajectory's mean temperatures (no noise), or null. */
  firstYearBelowOne: number | null;
  /** Share of replicates with at least one year of λ_t < 1, and the year by which half of them have one. */
  shareEverBelowOne: number;
  medianFirstYearBelowOne: number | null;
  /** Quasi-extinction: the share of replicates below `threshold` individuals at the end (after `lastYear`), or null without a threshold. */
  threshold: number | null;
  shareBelowThresholdAtEnd: number | null;
  /** Median and 5–95 % of total N at the end, and the projection without noise. */
  finalMedian: number;
  finalLow: number;
  finalHigh: number;
  finalDeterministic: number;
}

/** Climate: λ over a temperature range, the persistence window (λ ≥ 1), the slope at the reference temperature, and the warming Run. */
export interface ReportClimate {
  /** °C; `saved` is false when the document names no range and the Climate tab's default is used. */
  range: { min: number; max: number; saved: boolean };
  responses: ReportThermalResponse[];
  /** Stretches with λ ≥ 1, °C; an edge is null where the stretch runs on past the end of the range. Empty when λ < 1 throughout. */
  window: { from: number; to: number; lower: number | null; upper: number | null }[];
  optimum: { temperature: number; lambda: number; atBoundary: boolean } | null;
  /** dλ/dT at the reference temperature, split by rate: (∂λ/∂x)(dx/dT). */
  slope: {
    temperature: number;
    /** Why this temperature: the warming trajectory's first year, the responses' common reference temperature, or the middle of the window or range. */
    basis: "trajectory" | "reference" | "window" | "range";
    lambda: number;
    slope: number;
    contributions: { name: string; value: number; rateSlope: number; sensitivity: number; contribution: number }[];
  } | null;
  /** Probabilities pushed past 1 by their response and held at 1, with the °C stretch. */
  clamped: { name: string; from: number; to: number; worst: number }[];
  warming: ReportWarming | null;
  /** Why λ(T) cannot be computed (a formula that fails at some temperature). */
  problem: string | null;
  /** Cautions that apply to this life cycle's Climate results. */
  cautions: string[];
}

export interface ReportReview {
  status: ReviewStatus;
  /** Every decision and open request, newest first. */
  reviews: ReviewView[];
}

export interface ReportFigures {
  /** SVG strings, drawn on the server (the diagram by shared/diagram, charts by ECharts' server-side renderer). */
  diagram: string;
  elasticity: string | null;
  stageVectors: string | null;
  risk: string | null;
  /** λ of the baseline and each scenario. */
  scenarios: string | null;
  /** λ(T) with the persistence window shaded. */
  climate: string | null;
  /** N(t) of the warming Run: the projection without noise and the replicates' median and 5–95 %. */
  warming: string | null;
}

export interface LifeCycleReport {
  generatedAt: string;
  study: { id: string; name: string };
  lifeCycle: { id: string; name: string };
  source: ReportSource;
  /** People who saved or snapshotted this life cycle, most active first. */
  authors: string[];
  document: LifeCycle;
  analysis: LifeCycleAnalysis | null;
  /** Why there is no analysis (a rate that cannot be computed, no stages). */
  analysisProblem: string | null;
  verdict: Verdict | null;
  /** λ's interval from the newest finished Monte Carlo Run, when there is one. */
  lambdaRun: ReportLambdaRun | null;
  risk: ReportRisk | null;
  levers: ReportLevers | null;
  /** null when no vital rate has a thermal response. */
  climate: ReportClimate | null;
  review: ReportReview;
  snapshots: SnapshotSummary[];
  cautions: readonly string[];
  figures: ReportFigures;
}
