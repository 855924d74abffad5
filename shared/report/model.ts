/**
 * What a life cycle's report holds: one object, built by the server, shown by
 * the report page and drawn into the PDF, so the page and the PDF cannot say
 * different things.
 */
import type { Verdict } from "../format/verdict";
import type { LifeCycle } from "../lifecycle";
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
  risk: ReportRisk | null;
  levers: ReportLevers | null;
  review: ReportReview;
  snapshots: SnapshotSummary[];
  cautions: readonly string[];
  figures: ReportFigures;
}
