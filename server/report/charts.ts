/**
 * The report's charts as SVG, drawn on the server by ECharts' own
 * server-side renderer (no browser, no DOM). Only the chart types used are
 * registered.
 */
import { BarChart, HeatmapChart, LineChart } from "echarts/charts";
import { GridComponent, LegendComponent, MarkAreaComponent, MarkLineComponent, MarkPointComponent, VisualMapComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { SVGRenderer } from "echarts/renderers";
import { CLAY, INDIGO, INK, PAPER, SPRUCE } from "../../shared/diagram/palette";
import { formatNumber } from "../../shared/format/number-format";
import type { LambdaCurve } from "../../shared/climate";
import type { ScenarioComparison } from "../../shared/levers";
import type { WarmingRunResult } from "../../shared/schemas/climate";
import type { RiskRunResult } from "../../shared/schemas/runs";

echarts.use([HeatmapChart, BarChart, LineChart, GridComponent, VisualMapComponent, LegendComponent, MarkAreaComponent, MarkLineComponent, MarkPointComponent, SVGRenderer]);

const FONT = { fontFamily: "DejaVu Sans, sans-serif", color: INK };

function render(width: number, height: number, option: echarts.EChartsCoreOption): string {
  const chart = echarts.init(null, null, { renderer: "svg", ssr: true, width, height });
  try {
    chart.setOption({ animation: false, textStyle: FONT, ...option });
    return chart.renderToSVGString();
  } finally {
    chart.dispose();
  }
}

const shortName = (s: string) => (s.length > 14 ? `${s.slice(0, 13)}…` : s);

/** Elasticities e_ij as a heatmap from paper to spruce: rows = stage at t+1, columns = stage at t. */
export function elasticityHeatmap(elasticity: number[][], names: string[]): string {
  const n = names.length;
  let max = 0;
  for (const row of elasticity) for (const e of row) if (e > max) max = e;
  // Labels in white on the darker cells, ink on the paler ones.
  const data = elasticity.flatMap((row, i) => row.map((e, j) => ({ value: [j, n - 1 - i, e], label: { color: e > 0.5 * max ? "#ffffff" : INK } })));
  const cell = Math.max(18, Math.min(56, Math.floor(440 / Math.max(n, 1))));
  const width = 150 + cell * n;
  const height = 90 + cell * n;
  return render(width, height, {
    grid: { left: 120, right: 20, top: 20, bottom: 60 },
    xAxis: { type: "category", data: names.map(shortName), name: "stage at t", nameLocation: "middle", nameGap: 42, axisLabel: { rotate: n > 6 ? 45 : 0, fontSize: 10 }, splitArea: { show: false } },
    yAxis: { type: "category", data: [...names].reverse().map(shortName), name: "stage at t+1", nameLocation: "middle", nameGap: 100, axisLabel: { fontSize: 10 } },
    visualMap: { min: 0, max: max > 0 ? max : 1, show: false, inRange: { color: [PAPER, SPRUCE] } },
    series: [
      {
        type: "heatmap",
        data,
        itemStyle: { borderColor: "#ffffff", borderWidth: 1 },
        label: { show: n <= 12, fontSize: n > 8 ? 8 : 10, formatter: (p: { value: [number, number, number] }) => (p.value[2] === 0 ? "" : p.value[2].toFixed(3)) },
      },
    ],
  });
}

/** Stable stage distribution w and reproductive values v side by side. */
export function stageVectorsChart(names: string[], w: number[], v: number[] | null): string {
  const width = Math.max(420, 60 + names.length * 48);
  const vmax = v ? Math.max(...v.filter(Number.isFinite)) : 1;
  return render(width, 290, {
    grid: { left: 56, right: 56, top: 40, bottom: 80 },
    legend: { bottom: 0, textStyle: FONT },
    xAxis: { type: "category", data: names.map(shortName), axisLabel: { rotate: names.length > 6 ? 45 : 0, fontSize: 10 } },
    yAxis: [
      { type: "value", name: "share w", min: 0, max: 1, axisLabel: { formatter: (x: number) => `${Math.round(x * 100)} %` } },
      { type: "value", name: "value v", min: 0, max: vmax > 0 ? undefined : 1, splitLine: { show: false } },
    ],
    series: [
      { name: "Stable stage distribution w", type: "bar", data: w, itemStyle: { color: SPRUCE } },
      ...(v ? [{ name: "Reproductive value v", type: "bar", yAxisIndex: 1, data: v, itemStyle: { color: INDIGO } }] : []),
    ],
  });
}

/** Quasi-extinction probability by year with its 95 % band. */
export function riskChart(result: RiskRunResult): string {
  const { year, probability, lower, upper } = result.quasiExtinction.byYear;
  const unit = result.timeStepUnit;
  return render(520, 300, {
    grid: { left: 60, right: 20, top: 36, bottom: 70 },
    legend: { bottom: 0, textStyle: FONT, data: ["Quasi-extinction probability", "95 % band"] },
    xAxis: { type: "value", name: `${unit}s from now`, nameLocation: "middle", nameGap: 26, min: 0, max: result.horizon },
    yAxis: { type: "value", name: "probability", min: 0, max: 1, axisLabel: { formatter: (x: number) => formatNumber(x, 2) } },
    series: [
      { name: "95 % band", type: "line", data: year.map((t, k) => [t, lower[k]]), showSymbol: false, lineStyle: { color: CLAY, type: "dashed", width: 1 }, itemStyle: { color: CLAY } },
      { name: "Quasi-extinction probability", type: "line", data: year.map((t, k) => [t, probability[k]]), showSymbol: false, lineStyle: { color: CLAY, width: 2 }, itemStyle: { color: CLAY } },
      { name: "95 % band", type: "line", data: year.map((t, k) => [t, upper[k]]), showSymbol: false, lineStyle: { color: CLAY, type: "dashed", width: 1 }, itemStyle: { color: CLAY } },
    ],
  });
}

/** λ of the baseline and of each scenario that can be applied, with λ = 1 drawn across. */
export function scenarioChart(comparison: ScenarioComparison): string | null {
  const rows = comparison.rows.filter((r) => r.planned);
  if (rows.length < 2) return null;
  const names = rows.map((r) => shortName(r.name));
  const values = rows.map((r) => r.planned!.lambda);
  const top = Math.max(1.05, ...values) * 1.05;
  const width = Math.max(420, 80 + rows.length * 70);
  return render(width, 280, {
    grid: { left: 56, right: 20, top: 30, bottom: rows.length > 5 ? 90 : 60 },
    legend: { bottom: 0, textStyle: FONT, data: ["λ", "λ = 1"] },
    xAxis: { type: "category", data: names, axisLabel: { rotate: rows.length > 5 ? 30 : 0, fontSize: 10, interval: 0 } },
    yAxis: { type: "value", name: "λ", min: 0, max: Number(top.toFixed(2)) },
    series: [
      {
        name: "λ",
        type: "bar",
        data: values.map((v, i) => ({ value: v, itemStyle: { color: i === 0 ? INK : v >= 1 ? SPRUCE : CLAY } })),
        label: { show: true, position: "top", fontSize: 10, formatter: (p: { value: number }) => p.value.toFixed(4) },
      },
      { name: "λ = 1", type: "line", data: names.map(() => 1), symbol: "none", lineStyle: { color: INDIGO, type: "dashed", width: 1 }, itemStyle: { color: INDIGO } },
    ],
  });
}

const celsius = (t: number) => `${formatNumber(t, 4)} °C`;

/**
 * λ over temperature with the persistence window (λ ≥ 1) shaded, λ = 1
 * dashed, each window edge marked with its temperature and the optimum dotted.
 */
export function climateChart(curve: LambdaCurve, timeStepUnit: string): string {
  const { temperatures, lambda } = curve;
  // λ = 1 always in view; the axis hugs the curve so its rise and fall can be read.
  const finite = lambda.filter(Number.isFinite);
  const lo = Math.min(1, ...finite);
  const hi = Math.max(1, ...finite);
  const pad = Math.max(0.02, 0.08 * (hi - lo));
  // Round the ends to a step that gives about five ticks, so the axis ends on a labelled value.
  const step = [0.01, 0.02, 0.05, 0.1, 0.2, 0.5, 1, 2, 5].find((x) => (hi - lo + 2 * pad) / x <= 8) ?? 10;
  const yMin = Math.max(0, Math.floor((lo - pad) / step) * step);
  const yMax = Math.ceil((hi + pad) / step) * step;
  const edges = curve.window.flatMap((w) => [w.lower, w.upper].filter((e) => e !== null));
  const yMaxWithLabel = yMax + step; // room for the optimum's label above the curve
  return render(540, 300, {
    grid: { left: 60, right: 30, top: 44, bottom: 70 },
    legend: { bottom: 0, textStyle: FONT, data: ["λ(T)", "λ = 1"] },
    xAxis: { type: "value", name: "temperature (°C)", nameLocation: "middle", nameGap: 26, min: temperatures[0], max: temperatures[temperatures.length - 1] },
    yAxis: { type: "value", name: `λ (per ${timeStepUnit})`, min: Number(yMin.toFixed(2)), max: Number(yMaxWithLabel.toFixed(2)), interval: step, axisLabel: { formatter: (x: number) => formatNumber(x, 3) } },
    series: [
      {
        name: "λ(T)",
        type: "line",
        data: temperatures.map((t, i) => [t, lambda[i]]),
        showSymbol: false,
        lineStyle: { color: SPRUCE, width: 2.5 },
        itemStyle: { color: SPRUCE },
        markArea: {
          silent: true,
          itemStyle: { color: SPRUCE, opacity: 0.14 },
          label: { show: true, position: "insideBottom", color: SPRUCE, fontSize: 10, formatter: "λ ≥ 1" },
          data: curve.window.map((w) => [{ xAxis: w.from }, { xAxis: w.to }]),
        },
        // Each edge labelled above the plot, the lower one to the left of its line and the upper one to the right, so a narrow window keeps both readable.
        markLine: {
          symbol: "none",
          silent: true,
          data: edges.map((e) => ({
            xAxis: e.temperature,
            lineStyle: { color: SPRUCE, type: "solid", width: 1 },
            label: { formatter: celsius(e.temperature), color: SPRUCE, fontSize: 10, position: "end", align: e.side === "lower" ? "right" : "left" },
          })),
        },
        markPoint: curve.optimum
          ? {
              silent: true,
              symbol: "circle",
              symbolSize: 6,
              itemStyle: { color: INDIGO },
              label: { show: true, position: "top", color: INDIGO, fontSize: 10, formatter: `optimum ${celsius(curve.optimum.temperature)}` },
              data: [{ coord: [curve.optimum.temperature, curve.optimum.lambda] }],
            }
          : undefined,
      },
      { name: "λ = 1", type: "line", data: [[temperatures[0], 1], [temperatures[temperatures.length - 1], 1]], symbol: "none", lineStyle: { color: INK, type: "dashed", width: 1 }, itemStyle: { color: INK } },
    ],
  });
}

/** Population size under warming: the projection without noise, and the replicates' median with their 5 % and 95 % lines. */
export function warmingChart(result: WarmingRunResult): string {
  const times = [...result.years, result.years[result.years.length - 1]! + 1];
  const q = (p: number) => result.quantiles.find((x) => x.q === p)?.values ?? [];
  const line = (name: string, values: number[], color: string, type: "solid" | "dashed" | "dotted", width: number) => ({
    name,
    type: "line",
    data: times.map((t, i) => [t, values[i]]),
    showSymbol: false,
    lineStyle: { color, type, width },
    itemStyle: { color },
  });
  const first = result.deterministic.firstYearBelowOne;
  return render(560, 320, {
    grid: { left: 64, right: 30, top: 40, bottom: 80 },
    legend: { bottom: 0, itemGap: 28, textStyle: FONT, data: ["Without noise", "Median of the replicates", "Their 5 % and 95 %"] },
    xAxis: { type: "value", name: "year", nameLocation: "middle", nameGap: 26, min: times[0], max: times[times.length - 1], axisLabel: { formatter: (x: number) => String(x), showMinLabel: true, showMaxLabel: false } },
    yAxis: { type: "value", name: "individuals", min: 0, axisLabel: { formatter: (x: number) => formatNumber(x, 3) } },
    series: [
      {
        ...line("Without noise", result.deterministic.total, INK, "solid", 2),
        markLine:
          first === null
            ? undefined
            : { symbol: "none", silent: true, data: [{ xAxis: first, lineStyle: { color: CLAY, type: "dashed", width: 1 }, label: { formatter: `λ_t < 1 from ${first}`, color: CLAY, fontSize: 10, position: "end" } }] },
      },
      line("Median of the replicates", q(0.5), SPRUCE, "solid", 2),
      line("Their 5 % and 95 %", q(0.05), SPRUCE, "dashed", 1),
      line("Their 5 % and 95 %", q(0.95), SPRUCE, "dashed", 1),
    ],
  });
}
