/**
 * The Risk charts on ECharts: quasi-extinction probability over time with its
 * 95 % band, the distribution of final abundance on log-spaced bins, and mean
 * abundance ± SD over time. Only the pieces used are registered, and the
 * module loads on demand (see risk-results.tsx).
 *
 * A band is two stacked series: the lower edge (drawn invisibly) and the
 * width of the band on top of it, filled. The tooltip reads the edges from
 * the data, not from the stack.
 */
import { BarChart, LineChart } from "echarts/charts";
import { GridComponent, LegendComponent, MarkLineComponent, TooltipComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { Chart, INK, SPRUCE, CLAY, INDIGO, FONT, textStyle, axisName, splitLine } from "../../components/ui/chart";
import { formatNumber } from "../../lib/number-format";
import { formatCount, formatProbability, pluralOf } from "./risk-format";

echarts.use([BarChart, LineChart, GridComponent, LegendComponent, MarkLineComponent, TooltipComponent]);

/** 1, 2 or 5 × 10ⁿ at or above x. */
function niceCeil(x: number): number {
  if (!(x > 0)) return 1;
  const p = 10 ** Math.floor(Math.log10(x));
  for (const m of [1, 2, 5, 10]) if (m * p >= x - 1e-12) return m * p;
  return 10 * p;
}

interface AxisTooltipParam {
  dataIndex: number;
}

function firstIndex(params: unknown): number {
  const list = (Array.isArray(params) ? params : [params]) as AxisTooltipParam[];
  return list[0]?.dataIndex ?? 0;
}

export interface QuasiExtinctionChartProps {
  year: readonly number[];
  probability: readonly number[];
  lower: readonly number[];
  upper: readonly number[];
  timeStepUnit: string;
  ariaLabel: string;
}

/** Cumulative probability of quasi-extinction by year (%), with the 95 % Wilson band. */
export function QuasiExtinctionChart({ year, probability, lower, upper, timeStepUnit, ariaLabel }: QuasiExtinctionChartProps) {
  const pct = (v: number) => v * 100;
  const top = Math.max(0, ...upper) * 100;
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 24, top: 40, bottom: 40, containLabel: true },
    legend: { top: 0, data: ["Probability of quasi-extinction", "95 % interval"], textStyle },
    tooltip: {
      trigger: "axis",
      formatter: (params: unknown) => {
        const t = firstIndex(params);
        return `${timeStepUnit} ${year[t]}<br/>probability ${formatProbability(probability[t])}<br/>95 % interval ${formatProbability(lower[t])} – ${formatProbability(upper[t])}`;
      },
    },
    xAxis: { type: "category", data: year, name: `time (${pluralOf(timeStepUnit)} from the start)`, nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, boundaryGap: false },
    yAxis: {
      type: "value",
      min: 0,
      max: top > 60 ? 100 : niceCeil(top * 1.1),
      name: "probability of having been quasi-extinct (%)",
      nameTextStyle: { ...axisName, align: "left" },
      axisLabel: { formatter: (v: number) => `${formatNumber(v, 3)} %` },
      splitLine,
    },
    series: [
      { name: "lower edge", type: "line", data: lower.map(pct), stack: "band", symbol: "none", lineStyle: { opacity: 0 }, silent: true },
      {
        name: "95 % interval",
        type: "line",
        data: upper.map((u, t) => pct(u - (lower[t] ?? 0))),
        stack: "band",
        symbol: "none",
        lineStyle: { opacity: 0 },
        areaStyle: { color: INDIGO, opacity: 0.22 },
        itemStyle: { color: "rgba(75, 79, 156, 0.35)" },
        silent: true,
      },
      { name: "Probability of quasi-extinction", type: "line", data: probability.map(pct), symbol: "none", lineStyle: { width: 2.5, color: INDIGO }, itemStyle: { color: INDIGO } },
    ],
  };
  return (
    <Chart option={option} ariaLabel={ariaLabel} height={340} />
  );
}

export interface FinalAbundanceChartProps {
  edges: readonly number[];
  counts: readonly number[];
  zeroCount: number;
  belowRange: number;
  aboveRange: number;
  replicates: number;
  /** "year 100" */
  when: string;
  ariaLabel: string;
}

const edge = (x: number) => formatNumber(x, 2);

/** Replicates by final total abundance: a bar for exactly 0, then log-spaced bins. */
export function FinalAbundanceChart({ edges, counts, zeroCount, belowRange, aboveRange, replicates, when, ariaLabel }: FinalAbundanceChartProps) {
  const bars: { label: string; count: number; zero?: boolean }[] = [{ label: "0 (none left)", count: zeroCount, zero: true }];
  const first = edges[0];
  const last = edges.at(-1);
  if (belowRange > 0 && first !== undefined) bars.push({ label: `under ${edge(first)}`, count: belowRange });
  counts.forEach((count, k) => bars.push({ label: `${edge(edges[k] ?? 0)}–${edge(edges[k + 1] ?? 0)}`, count }));
  if (aboveRange > 0 && last !== undefined) bars.push({ label: `${edge(last)} or more`, count: aboveRange });
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 16, top: 16, bottom: 56, containLabel: true },
    tooltip: {
      trigger: "axis",
      axisPointer: { type: "shadow" },
      formatter: (params: unknown) => {
        const b = bars[firstIndex(params)];
        if (!b) return "";
        return `${b.label} individuals<br/>${b.count.toLocaleString("en")} replicates (${formatProbability(replicates > 0 ? b.count / replicates : 0)})`;
      },
    },
    xAxis: {
      type: "category",
      data: bars.map((b) => b.label),
      name: `total individuals at ${when} (bins of equal width on a log scale)`,
      nameLocation: "middle",
      nameGap: 44,
      nameTextStyle: axisName,
      axisLabel: { rotate: 35, fontSize: 10, interval: bars.length > 16 ? 1 : 0 },
    },
    yAxis: { type: "value", name: "replicates", nameTextStyle: { ...axisName, align: "left" }, minInterval: 1, splitLine },
    series: [
      {
        type: "bar",
        barCategoryGap: "8%",
        data: bars.map((b) => ({ value: b.count, itemStyle: { color: b.zero ? CLAY : SPRUCE, ...(b.zero ? { decal: { symbol: "rect", dashArrayX: [1, 0], dashArrayY: [2, 4], rotation: 0.8 } } : {}) } })),
      },
    ],
  };
  return (
    <Chart option={option} ariaLabel={ariaLabel} height={320} />
  );
}

export interface AbundanceChartProps {
  mean: readonly number[];
  sd: readonly number[];
  timeStepUnit: string;
  /** Drawn as a dashed line when the threshold is on the total. */
  threshold: number | null;
  ariaLabel: string;
}

/** Mean total abundance by year with a band of ± 1 SD (cut at 0). */
export function AbundanceChart({ mean, sd, timeStepUnit, threshold, ariaLabel }: AbundanceChartProps) {
  const years = mean.map((_, t) => t);
  const lower = mean.map((m, t) => Math.max(0, m - (sd[t] ?? 0)));
  const upper = mean.map((m, t) => m + (sd[t] ?? 0));
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 24, top: 40, bottom: 40, containLabel: true },
    legend: { top: 0, data: ["Mean", "Mean ± 1 SD"], textStyle },
    tooltip: {
      trigger: "axis",
      formatter: (params: unknown) => {
        const t = firstIndex(params);
        return `${timeStepUnit} ${t}<br/>mean ${formatCount(mean[t])}<br/>SD ${formatCount(sd[t])}`;
      },
    },
    xAxis: { type: "category", data: years, name: `time (${pluralOf(timeStepUnit)} from the start)`, nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, boundaryGap: false },
    yAxis: {
      type: "value",
      min: 0,
      name: "total individuals",
      nameTextStyle: { ...axisName, align: "left" },
      axisLabel: { formatter: (v: number) => formatNumber(v, 3) },
      splitLine,
    },
    series: [
      { name: "lower edge", type: "line", data: lower, stack: "sd", symbol: "none", lineStyle: { opacity: 0 }, silent: true },
      {
        name: "Mean ± 1 SD",
        type: "line",
        data: upper.map((u, t) => u - (lower[t] ?? 0)),
        stack: "sd",
        symbol: "none",
        lineStyle: { opacity: 0 },
        areaStyle: { color: SPRUCE, opacity: 0.18 },
        itemStyle: { color: "rgba(47, 107, 90, 0.35)" },
        silent: true,
      },
      {
        name: "Mean",
        type: "line",
        data: mean,
        symbol: "none",
        lineStyle: { width: 2.5, color: SPRUCE },
        itemStyle: { color: SPRUCE },
        ...(threshold !== null
          ? {
              markLine: {
                silent: true,
                symbol: "none",
                lineStyle: { color: CLAY, type: "dashed", width: 1.5 },
                label: { formatter: `quasi-extinction threshold (${formatCount(threshold)})`, position: "insideEndTop", color: INK, fontFamily: FONT },
                data: [{ yAxis: threshold }],
              },
            }
          : {}),
      },
    ],
  };
  return (
    <Chart option={option} ariaLabel={ariaLabel} height={320} />
  );
}
