// The report's PDF: time to draw the charts (ECharts server-side SVG) and compose the PDF (PDFKit),
// for the 3-stage test life cycle, the same with thermal responses and a finished warming Run (the
// Climate section: λ(T) at 200 temperatures, its window and slope, two more charts), and a 20-stage
// one. No budget in the issue: the figure is reported.
// Run: npm run bench:report
import { cpus } from "node:os";
import { projectTrajectory, simulateTrajectoryReplicates, summariseReplicates, thermalModel, trajectoryTemperatures } from "../shared/climate";
import { compareScenarios, leverModel, rankLevers } from "../shared/levers";
import { diagramSvg } from "../shared/diagram/svg";
import { lambdaVerdict } from "../shared/format/verdict";
import { LIFE_CYCLE_SCHEMA_VERSION, type LifeCycle } from "../shared/lifecycle";
import { REPORT_CAUTIONS, type LifeCycleReport } from "../shared/report/model";
import { elasticityHeatmap, scenarioChart, stageVectorsChart } from "../server/report/charts";
import { climateSection } from "../server/report/climate-section";
import { reportPdf } from "../server/report/pdf";
import { analyzeLifeCycle } from "../server/services/analysis";
import type { ReportWarming } from "../shared/report/model";
import type { WarmingRunResult } from "../shared/schemas/climate";
import type { WarmingTrajectory } from "../shared/lifecycle/thermal";
import { warmableLifeCycle } from "../tests/factories/climate";
import { threeStageLifeCycle } from "../tests/factories/life-cycles";

const TRAJECTORY: WarmingTrajectory = { kind: "trend", startYear: 2026, years: 100, baseline: 19, trendPerDecade: 1, sd: 0.9 };

/** The 3-stage life cycle with thermal responses on s_j and f, a range and a warming trajectory. */
function withClimate(): LifeCycle {
  return warmableLifeCycle({}, { name: "Three stages, Climate", climate: { range: { min: 0, max: 35 }, trajectory: TRAJECTORY } });
}

/** A finished warming Run of 1,000 replicates, merged as the Run kind merges it (not timed). */
function warmingRun(doc: LifeCycle): { summary: ReportWarming; result: WarmingRunResult } {
  const model = thermalModel(doc);
  const { years, temperatures } = trajectoryTemperatures(TRAJECTORY);
  const chunk = simulateTrajectoryReplicates(model, temperatures, 0.9, 500, 1000, 7, 0);
  const result: WarmingRunResult = {
    ...summariseReplicates([chunk], years.length, 50),
    years,
    meanTemperatures: temperatures,
    sd: 0.9,
    seed: 7,
    threshold: 50,
    timeStepUnit: doc.timeStepUnit,
    deterministic: projectTrajectory(model, years, temperatures, 500),
  };
  const last = (q: number) => result.quantiles.find((x) => x.q === q)!.values[years.length]!;
  return {
    result,
    summary: {
      runId: "bench",
      finishedAt: new Date().toISOString(),
      trajectory: "bench trajectory",
      firstYear: years[0]!,
      lastYear: years[years.length - 1]!,
      replicates: 1000,
      seed: 7,
      sd: 0.9,
      initialTotal: 500,
      timeStepUnit: "year",
      firstYearBelowOne: result.deterministic.firstYearBelowOne,
      shareEverBelowOne: result.shareEverBelowOne,
      medianFirstYearBelowOne: null,
      threshold: 50,
      shareBelowThresholdAtEnd: result.belowThreshold![years.length]!,
      finalMedian: last(0.5),
      finalLow: last(0.05),
      finalHigh: last(0.95),
      finalDeterministic: result.deterministic.total[years.length]!,
    },
  };
}

/** An invented 20-class life cycle: stasis, growth to the next class, reproduction from class 11 on; one scenario. */
function twentyClasses(): LifeCycle {
  const n = 20;
  const stages = Array.from({ length: n }, (_, i) => ({ id: `st_${i}`, name: `Class ${i + 1}`, position: { x: (i % 5) * 220, y: Math.floor(i / 5) * 140 } }));
  const rates = [
    { id: "vr_s", name: "s", value: 0.8, se: 0.04 },
    { id: "vr_g", name: "g", value: 0.3, se: 0.05 },
    { id: "vr_f", name: "f", value: 0.9 },
  ];
  const transitions = stages.flatMap((s, i) => [
    { id: `tr_s${i}`, from: s.id, to: s.id, kind: "stasis" as const, rate: i === n - 1 ? "s" : "s * (1 - g)" },
    ...(i < n - 1 ? [{ id: `tr_g${i}`, from: s.id, to: stages[i + 1]!.id, kind: "growth" as const, rate: "s * g" }] : []),
    ...(i >= 10 ? [{ id: `tr_f${i}`, from: s.id, to: stages[0]!.id, kind: "reproduction" as const, rate: "f" }] : []),
  ]);
  return {
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: "Twenty classes",
    census: "pre-breeding",
    timeStepUnit: "year",
    stages,
    rates,
    transitions,
    scenarios: [{ id: "sc_1", name: "Raise survival", changes: [{ id: "ch_1", target: { kind: "rate", rateId: "vr_s" }, op: "multiply", value: 1.05 }] }],
  } as LifeCycle;
}

function assemble(doc: LifeCycle, warming: ReturnType<typeof warmingRun> | null): { report: Omit<LifeCycleReport, "figures">; chartsMs: number; figures: LifeCycleReport["figures"] } {
  const a = analyzeLifeCycle(doc);
  const names = doc.stages.map((s) => s.name);
  const scenarios = doc.scenarios ?? [];
  const comparison = scenarios.length ? compareScenarios(doc, scenarios) : null;
  const ranking = rankLevers(leverModel(doc), { relativeChange: 0.1, scenarios });
  const t = performance.now();
  const climate = climateSection(doc, true, warming);
  const figures = {
    diagram: diagramSvg(doc, new Map()).svg,
    elasticity: elasticityHeatmap(a.elasticity!, names),
    stageVectors: stageVectorsChart(names, a.stableStage!, a.reproductiveValue),
    risk: null,
    scenarios: comparison ? scenarioChart(comparison) : null,
    climate: climate?.figures.climate ?? null,
    warming: climate?.figures.warming ?? null,
  };
  const chartsMs = performance.now() - t;
  const now = new Date().toISOString();
  return {
    chartsMs,
    figures,
    report: {
      generatedAt: now,
      study: { id: "bench", name: "Bench Study" },
      lifeCycle: { id: "bench", name: doc.name },
      source: { kind: "current", version: 1, savedAt: now, latestSnapshot: null },
      authors: ["Bench"],
      document: doc,
      analysis: a,
      analysisProblem: null,
      verdict: lambdaVerdict(a.lambda, doc.timeStepUnit),
      lambdaRun: null,
      risk: null,
      climate: climate?.summary ?? null,
      levers: {
        comparison,
        relativeChange: 0.1,
        topLevers: ranking.rows.slice(0, 8).map((r) => ({ label: r.label, value: r.value, elasticity: r.elasticity, deltaUp: r.increase.deltaLambda, deltaDown: r.decrease.deltaLambda })),
        problem: null,
      },
      review: { status: { state: "none", snapshotId: null, snapshotNumber: null, changedSinceApproval: false, approvals: 0, changeRequests: 0, pending: 0 }, reviews: [] },
      snapshots: [],
      cautions: REPORT_CAUTIONS,
    } as unknown as Omit<LifeCycleReport, "figures">,
  };
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
console.log(`Report PDF bench on ${cpus().length} cores (${cpus()[0]?.model ?? "?"}), Node ${process.version}`);
const climateDoc = withClimate();
const cases = [
  ["3 stages", threeStageLifeCycle(), null],
  ["3 stages + Climate", climateDoc, warmingRun(climateDoc)],
  ["20 stages", twentyClasses(), null],
] as const;
for (const [label, doc, warming] of cases) {
  const charts: number[] = [];
  const pdfs: number[] = [];
  let bytes = 0;
  for (let k = 0; k < 7; k++) {
    const { report, figures, chartsMs } = assemble(doc, warming);
    const t = performance.now();
    const pdf = await reportPdf({ ...report, figures } as LifeCycleReport, "a4");
    const ms = performance.now() - t;
    if (k >= 2) {
      charts.push(chartsMs);
      pdfs.push(ms);
    }
    bytes = pdf.length;
  }
  console.log(`${label.padEnd(19)} charts (ECharts SSR${warming ? " + λ(T)" : ""}) median ${median(charts).toFixed(0)} ms · PDF (PDFKit) median ${median(pdfs).toFixed(0)} ms · ${(bytes / 1024).toFixed(0)} kB (5 measured runs after 2 warm-up)`);
}
