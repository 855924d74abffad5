/**
 * Field-data charts on ECharts: census counts over time (with counts by stage
 * when mapped), the growth ratio λ_t of each interval, the probability of
 * quasi-extinction by horizon with its bootstrap band, and the distribution of
 * resampled λ. Only line and bar charts are registered; the module loads on demand.
 */
import { BarChart, LineChart } from "echarts/charts";
import { GridComponent, LegendComponent, MarkLineComponent, TooltipComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { Chart, INK, SPRUCE, CLAY, INDIGO, OCHRE, GRID_LINE, textStyle, axisName, splitLine } from "../../components/ui/chart";
import { formatNumber } from "../../lib/number-format";

echarts.use([BarChart, LineChart, GridComponent, LegendComponent, MarkLineComponent, TooltipComponent]);

const STAGE_COLOURS = [CLAY, OCHRE, INDIGO, "#6b5a2f", "#2f4f6b"];

export interface CountsChartProps {
  points: { t: number; label: string; count: number; stageCounts: Record<string, number | null> | null }[];
  stages: string[];
  countLabel: string;
  ariaLabel: string;
}

/** Counts by census time on a time axis (gaps show as gaps in the points), with counts by stage dashed. */
export function CountsChart({ points, stages, countLabel, ariaLabel }: CountsChartProps) {
  const series = [
    { name: countLabel, type: "line", data: points.map((p) => [p.t, p.count]), symbol: "circle", symbolSize: 7, lineStyle: { width: 2.5, color: SPRUCE }, itemStyle: { color: SPRUCE } },
    ...stages.map((s, k) => ({
      name: s,
      type: "line",
      data: points.map((p) => [p.t, p.stageCounts?.[s] ?? null]),
      symbol: "emptyCircle",
      symbolSize: 5,
      connectNulls: false,
      lineStyle: { width: 1.5, type: "dashed", color: STAGE_COLOURS[k % STAGE_COLOURS.length] },
      itemStyle: { color: STAGE_COLOURS[k % STAGE_COLOURS.length] },
    })),
  ];
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 24, top: 40, bottom: 40, containLabel: true },
    legend: { top: 0, textStyle },
    tooltip: { trigger: "axis", valueFormatter: (v: number) => formatNumber(v, 4) },
    xAxis: { type: "value", min: "dataMin", max: "dataMax", name: "census year", nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, axisLabel: { formatter: (v: number) => String(Math.round(v * 100) / 100) }, splitLine: { show: false } },
    yAxis: { type: "value", min: 0, name: "count", nameTextStyle: { ...axisName, align: "left" }, splitLine },
    series,
  };
  return <Chart option={option} ariaLabel={ariaLabel} />;
}

/** λ_t = N_{t+1}/N_t of each interval as bars around the line λ = 1; intervals left out are marked. */
export function RatioChart({ intervals, ariaLabel }: { intervals: { from: number; to: number; ratio: number | null; used: boolean }[]; ariaLabel: string }) {
  const labels = intervals.map((i) => `${formatNumber(i.from, 6)}–${formatNumber(i.to, 6)}`);
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 56, top: 24, bottom: 56, containLabel: true },
    tooltip: { trigger: "axis", axisPointer: { type: "shadow" }, valueFormatter: (v: number | null) => (v === null ? "no ratio" : formatNumber(v, 4)) },
    xAxis: { type: "category", data: labels, name: "interval", nameLocation: "middle", nameGap: 40, nameTextStyle: axisName, axisLabel: { rotate: 35 } },
    yAxis: { type: "value", name: "λ_t = N(t+1) / N(t)", nameTextStyle: { ...axisName, align: "left" }, splitLine },
    series: [
      {
        name: "λ_t",
        type: "bar",
        data: intervals.map((i) => ({ value: i.ratio, itemStyle: { color: !i.used ? GRID_LINE : (i.ratio ?? 0) >= 1 ? SPRUCE : CLAY } })),
        markLine: { silent: true, symbol: "none", data: [{ yAxis: 1 }], lineStyle: { color: INK, type: "dashed" }, label: { formatter: "λ = 1", color: INK } },
      },
    ],
  };
  return <Chart option={option} ariaLabel={ariaLabel} height={260} />;
}

/** Probability of falling to the threshold by each horizon, with its bootstrap band (%). */
export function RiskCurveChart({ horizons, probability, lower, upper, ariaLabel }: { horizons: number[]; probability: number[]; lower: number[]; upper: number[]; ariaLabel: string }) {
  const pct = (v: number) => v * 100;
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 24, top: 40, bottom: 40, containLabel: true },
    legend: { top: 0, data: ["Probability", "95 % bootstrap interval"], textStyle },
    tooltip: {
      trigger: "axis",
      formatter: (params: unknown) => {
        const k = ((Array.isArray(params) ? params[0] : params) as { dataIndex: number }).dataIndex;
        return `${horizons[k]} years<br/>probability ${formatNumber(pct(probability[k]!), 3)} %<br/>95 % interval ${formatNumber(pct(lower[k]!), 3)}–${formatNumber(pct(upper[k]!), 3)} %`;
      },
    },
    xAxis: { type: "category", data: horizons, name: "horizon (years from the last count)", nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, boundaryGap: false },
    yAxis: { type: "value", min: 0, max: 100, name: "probability of reaching the threshold (%)", nameTextStyle: { ...axisName, align: "left" }, splitLine },
    series: [
      { name: "lower edge", type: "line", data: lower.map(pct), stack: "band", symbol: "none", lineStyle: { opacity: 0 }, silent: true },
      { name: "95 % bootstrap interval", type: "line", data: upper.map((u, k) => pct(u - lower[k]!)), stack: "band", symbol: "none", lineStyle: { opacity: 0 }, areaStyle: { color: INDIGO, opacity: 0.22 }, itemStyle: { color: "rgba(75, 79, 156, 0.35)" }, silent: true },
      { name: "Probability", type: "line", data: probability.map(pct), symbol: "none", lineStyle: { width: 2.5, color: INDIGO }, itemStyle: { color: INDIGO } },
    ],
  };
  return <Chart option={option} ariaLabel={ariaLabel} />;
}

/** Histogram of resampled λ with λ = 1 and the estimate marked. */
export function LambdaHistogram({ bins, estimate, ariaLabel }: { bins: { from: number; to: number; count: number }[]; estimate: number; ariaLabel: string }) {
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 24, top: 24, bottom: 40, containLabel: true },
    tooltip: { trigger: "axis", axisPointer: { type: "shadow" } },
    xAxis: { type: "category", data: bins.map((b) => formatNumber((b.from + b.to) / 2, 4)), name: "λ of a resample", nameLocation: "middle", nameGap: 26, nameTextStyle: axisName },
    yAxis: { type: "value", name: "resamples", nameTextStyle: { ...axisName, align: "left" }, splitLine },
    series: [
      {
        name: "resamples",
        type: "bar",
        barCategoryGap: "5%",
        data: bins.map((b) => ({ value: b.count, itemStyle: { color: b.to <= 1 ? CLAY : SPRUCE } })),
        markLine: {
          silent: true,
          symbol: "none",
          lineStyle: { color: INK, type: "dashed" },
          data: [{ xAxis: Math.max(0, bins.findIndex((b) => b.to >= estimate)), label: { formatter: `λ̂ ${estimate.toFixed(4)}`, color: INK } }],
        },
      },
    ],
  };
  return <Chart option={option} ariaLabel={ariaLabel} height={260} />;
}
