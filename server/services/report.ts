/**
 * A life cycle's report: everything the report page and the PDF show, in one
 * object built from the stored state (the saved life cycle or one of its
 * snapshots), its analysis, its newest finished Risk run and its authors.
 */
import { and, desc, eq, inArray, isNotNull, sql } from "drizzle-orm";
import { diagramSvg, type DiagramReadout } from "../../shared/diagram/svg";
import { describeTrajectory } from "../../shared/climate";
import { lambdaVerdict } from "../../shared/format/verdict";
import { compareScenarios, LeverError, leverModel, rankLevers } from "../../shared/levers";
import type { LifeCycle } from "../../shared/lifecycle";
import {
  REPORT_CAUTIONS,
  type LifeCycleReport,
  type ReportLambdaRun,
  type ReportLevers,
  type ReportRisk,
  type ReportSource,
  type ReportWarming,
} from "../../shared/report/model";
import type { WarmingRunResult, WarmingSettings } from "../../shared/schemas/climate";
import type { UncertaintyRunResult } from "../../shared/schemas/uncertainty";
import type { LifeCycleAnalysis } from "../../shared/schemas/life-cycles";
import type { RiskRunResult } from "../../shared/schemas/runs";
import type { Db } from "../db/client";
import { auditEvents, runs, studies, users } from "../db/schema";
import { HttpError, notFound } from "../http/errors";
import { elasticityHeatmap, riskChart, scenarioChart, stageVectorsChart } from "../report/charts";
import { climateSection, type ClimateSection } from "../report/climate-section";
import { analyzeLifeCycle } from "./analysis";
import { getLifeCycle } from "./life-cycles";
import { lifeCycleReviews } from "./reviews";
import { getSnapshot, listSnapshots } from "./snapshots";

/** The report of a life cycle as saved now, or of one of its snapshots. */
export async function buildReport(db: Db, lifeCycleId: string, options: { snapshotId?: string } = {}): Promise<LifeCycleReport> {
  const record = await getLifeCycle(db, lifeCycleId);
  const snapshots = await listSnapshots(db, lifeCycleId);
  let document: LifeCycle;
  let source: ReportSource;
  if (options.snapshotId) {
    const snap = snapshots.find((s) => s.id === options.snapshotId);
    if (!snap) throw new HttpError(400, "That snapshot is not one of this life cycle's.", "bad_request", [{ path: "snapshot", message: "Choose one of this life cycle's snapshots." }]);
    document = (await getSnapshot(db, snap.id)).document;
    source = { kind: "snapshot", id: snap.id, number: snap.number, message: snap.message, createdAt: snap.createdAt, authorName: snap.authorName };
  } else {
    document = record.document;
    const latest = snapshots[0];
    source = {
      kind: "current",
      version: record.version,
      savedAt: record.updatedAt,
      latestSnapshot: latest ? { id: latest.id, number: latest.number, createdAt: latest.createdAt, sameAsNow: latest.lifeCycleVersion === record.version } : null,
    };
  }

  const [study] = await db.select({ id: studies.id, name: studies.name }).from(studies).where(eq(studies.id, record.studyId));
  if (!study) throw notFound("No such life cycle.");

  let analysis: LifeCycleAnalysis | null = null;
  let analysisProblem: string | null = null;
  try {
    analysis = analyzeLifeCycle(document, { status: 422 });
  } catch (err) {
    if (!(err instanceof HttpError)) throw err;
    analysisProblem = err.message;
  }

  const risk = await latestRisk(db, lifeCycleId);
  const levers = analysis ? leversOf(document) : null;
  const climate = await climateOf(db, lifeCycleId, document, analysis !== null);
  const names = document.stages.map((s) => s.name);
  const readouts = new Map<string, DiagramReadout>();
  if (analysis) {
    document.stages.forEach((s, i) => readouts.set(s.id, { share: analysis.stableStage?.[i] ?? null, value: analysis.reproductiveValue?.[i] ?? null, stale: false }));
  }
  return {
    generatedAt: new Date().toISOString(),
    study,
    lifeCycle: { id: record.id, name: document.name },
    source,
    authors: await authorsOf(db, lifeCycleId),
    document,
    analysis,
    analysisProblem,
    verdict: analysis && analysis.lambda !== null ? lambdaVerdict(analysis.lambda, document.timeStepUnit) : null,
    lambdaRun: await latestMonteCarlo(db, lifeCycleId, source.kind === "current" ? source.version : snapshotVersion(snapshots, source.id)),
    risk: risk?.summary ?? null,
    levers,
    climate: climate?.summary ?? null,
    review: await lifeCycleReviews(db, lifeCycleId),
    snapshots,
    cautions: REPORT_CAUTIONS,
    figures: {
      diagram: diagramSvg(document, new Map(), readouts).svg,
      elasticity: analysis?.elasticity ? elasticityHeatmap(analysis.elasticity, names) : null,
      stageVectors: analysis?.stableStage ? stageVectorsChart(names, analysis.stableStage, analysis.reproductiveValue) : null,
      risk: risk ? riskChart(risk.result) : null,
      scenarios: levers?.comparison ? scenarioChart(levers.comparison) : null,
      climate: climate?.figures.climate ?? null,
      warming: climate?.figures.warming ?? null,
    },
  };
}

const RELATIVE_CHANGE = 0.1;

/** The document's scenarios compared, and the levers that move λ most by ±10 % (the Levers tab's defaults). */
function leversOf(doc: LifeCycle): ReportLevers {
  try {
    const scenarios = doc.scenarios ?? [];
    const ranking = rankLevers(leverModel(doc), { relativeChange: RELATIVE_CHANGE, scenarios });
    const topLevers = [...ranking.rows]
      .filter((r) => r.increase.deltaLambda !== null || r.decrease.deltaLambda !== null)
      .sort((a, b) => Math.abs(b.increase.deltaLambda ?? b.decrease.deltaLambda ?? 0) - Math.abs(a.increase.deltaLambda ?? a.decrease.deltaLambda ?? 0))
      .slice(0, 8)
      .map((r) => ({ label: r.label, value: r.value, elasticity: r.elasticity, deltaUp: r.increase.deltaLambda, deltaDown: r.decrease.deltaLambda }));
    return { comparison: scenarios.length > 0 ? compareScenarios(doc, scenarios) : null, relativeChange: RELATIVE_CHANGE, topLevers, problem: null };
  } catch (err) {
    if (!(err instanceof LeverError)) throw err;
    return { comparison: null, relativeChange: RELATIVE_CHANGE, topLevers: [], problem: err.message };
  }
}

/** The Climate section with the newest finished warming Run; null when no rate has a thermal response. */
async function climateOf(db: Db, lifeCycleId: string, doc: LifeCycle, analysable: boolean): Promise<ClimateSection | null> {
  if (!doc.rates.some((r) => r.thermal)) return null;
  return climateSection(doc, analysable, await latestWarming(db, lifeCycleId));
}

async function latestWarming(db: Db, lifeCycleId: string): Promise<{ summary: ReportWarming; result: WarmingRunResult } | null> {
  const [row] = await db
    .select({ id: runs.id, finishedAt: runs.finishedAt, settings: runs.settings, result: runs.result })
    .from(runs)
    .where(and(eq(runs.lifeCycleId, lifeCycleId), eq(runs.kind, "warming"), eq(runs.status, "succeeded"), isNotNull(runs.result)))
    .orderBy(desc(runs.finishedAt))
    .limit(1);
  if (!row) return null;
  const r = row.result as WarmingRunResult;
  const settings = row.settings as Partial<WarmingSettings>;
  const end = (q: number) => {
    const values = r.quantiles.find((x) => x.q === q)?.values ?? [];
    return values[values.length - 1] ?? NaN;
  };
  const lastYear = r.years[r.years.length - 1]!;
  return {
    result: r,
    summary: {
      runId: row.id,
      finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
      trajectory: describeTrajectory(settings.trajectory),
      firstYear: r.years[0]!,
      lastYear,
      replicates: r.replicates,
      seed: r.seed,
      sd: r.sd,
      initialTotal: typeof settings.initialTotal === "number" ? settings.initialTotal : null,
      timeStepUnit: r.timeStepUnit,
      firstYearBelowOne: r.deterministic.firstYearBelowOne,
      shareEverBelowOne: r.shareEverBelowOne,
      medianFirstYearBelowOne: r.medianFirstBelowIndex === null ? null : (r.years[r.medianFirstBelowIndex] ?? null),
      threshold: r.threshold,
      shareBelowThresholdAtEnd: r.belowThreshold ? (r.belowThreshold[r.belowThreshold.length - 1] ?? null) : null,
      finalMedian: end(0.5),
      finalLow: end(0.05),
      finalHigh: end(0.95),
      finalDeterministic: r.deterministic.total[r.deterministic.total.length - 1]!,
    },
  };
}

/** People who created, saved, restored or snapshotted the life cycle, most changes first. */
async function authorsOf(db: Db, lifeCycleId: string): Promise<string[]> {
  const count = sql<number>`count(*)::int`;
  const rows = await db
    .select({ name: users.name, changes: count })
    .from(auditEvents)
    .innerJoin(users, eq(users.id, auditEvents.actorId))
    .where(and(sql`${auditEvents.details} ->> 'lifeCycleId' = ${lifeCycleId}`, inArray(auditEvents.action, ["life_cycle.created", "life_cycle.updated", "life_cycle.restored", "snapshot.created", "snapshot.restored"])))
    .groupBy(users.id, users.name)
    .orderBy(desc(count), users.name);
  return rows.map((r) => r.name);
}

/** The life-cycle version a snapshot was taken from. */
function snapshotVersion(snapshots: { id: string; lifeCycleVersion: number }[], id: string): number | null {
  return snapshots.find((s) => s.id === id)?.lifeCycleVersion ?? null;
}

/** λ's percentile interval from the newest finished Monte Carlo uncertainty Run. */
async function latestMonteCarlo(db: Db, lifeCycleId: string, reportedVersion: number | null): Promise<ReportLambdaRun | null> {
  const [row] = await db
    .select({ id: runs.id, finishedAt: runs.finishedAt, result: runs.result })
    .from(runs)
    .where(and(eq(runs.lifeCycleId, lifeCycleId), eq(runs.kind, "uncertainty"), eq(runs.status, "succeeded"), isNotNull(runs.result)))
    .orderBy(desc(runs.finishedAt))
    .limit(1);
  if (!row) return null;
  const r = row.result as UncertaintyRunResult;
  return {
    runId: row.id,
    finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
    draws: r.draws,
    level: r.level,
    lower: r.lambda.lower,
    median: r.lambda.median,
    upper: r.lambda.upper,
    probabilityBelowOne: r.lambda.probabilityBelowOne,
    lifeCycleVersion: r.lifeCycleVersion,
    sameAsReported: reportedVersion !== null && r.lifeCycleVersion === reportedVersion,
  };
}

async function latestRisk(db: Db, lifeCycleId: string): Promise<{ summary: ReportRisk; result: RiskRunResult } | null> {
  const [row] = await db
    .select({ id: runs.id, finishedAt: runs.finishedAt, result: runs.result })
    .from(runs)
    .where(and(eq(runs.lifeCycleId, lifeCycleId), eq(runs.kind, "risk"), eq(runs.status, "succeeded"), isNotNull(runs.result)))
    .orderBy(desc(runs.finishedAt))
    .limit(1);
  if (!row) return null;
  const r = row.result as RiskRunResult;
  const sim = r.growthRate.simulated;
  const e = r.criterionE;
  return {
    result: r,
    summary: {
      runId: row.id,
      finishedAt: row.finishedAt ? row.finishedAt.toISOString() : null,
      timeStepUnit: r.timeStepUnit,
      horizon: r.horizon,
      replicates: r.replicates,
      thresholdRule: r.threshold.rule,
      probability: r.quasiExtinction.share,
      lower: r.quasiExtinction.byYear.lower[r.horizon] ?? r.quasiExtinction.share,
      upper: r.quasiExtinction.byYear.upper[r.horizon] ?? r.quasiExtinction.share,
      lambdaS: sim ? sim.lambdaS : null,
      lambdaSLower: sim ? Math.exp(sim.lower) : null,
      lambdaSUpper: sim ? Math.exp(sim.upper) : null,
      medianTime: r.quasiExtinction.medianTime,
      finalMean: r.finalAbundance.mean,
      criterionE: {
        highestMet: e.highestMet,
        lines: e.checks.map((c) => `${c.name}: ${c.status === "met" ? "threshold met" : c.status === "not-met" ? "not met" : "undetermined"} — ${c.explanation}`),
        caution: e.caution,
      },
    },
  };
}
