/**
 * The Levers charts on ECharts: λ of baseline and scenarios (bars with the
 * line λ = 1), the tornado of exact Δλ for a relative change down and up,
 * LTRE contributions as a diverging heatmap and as bars. Only the pieces used
 * are registered; the module loads when the Levers tab needs it.
 */
import { BarChart, HeatmapChart } from "echarts/charts";
import { GridComponent, LegendComponent, MarkLineComponent, TooltipComponent, VisualMapComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { Chart, INK, PAPER, SPRUCE, CLAY, INDIGO, FONT, textStyle, axisName, splitLine, fmt } from "../../components/ui/chart";
import { formatNumber } from "../../lib/number-format";

echarts.use([BarChart, HeatmapChart, GridComponent, LegendComponent, MarkLineComponent, TooltipComponent, VisualMapComponent]);

/**
 * λ of each row as bars drawn from λ = 1 (replacement): to the left in clay
 * for a declining population, to the right in spruce for a growing one, so a
 * bar's length is the distance from replacement, not from an arbitrary axis start.
 */
export function LambdaBars({ names, lambdas, ariaLabel }: { names: string[]; lambdas: (number | null)[]; ariaLabel: string }) {
  const fromOne = (x: number) => formatNumber(1 + x, 4);
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 72, top: 8, bottom: 40, containLabel: true },
    tooltip: { trigger: "axis", axisPointer: { type: "shadow" }, valueFormatter: (v: unknown) => (typeof v === "number" ? (1 + v).toFixed(4) : "—") },
    xAxis: { type: "value", name: "λ (bars start at λ = 1, where the population replaces itself)", nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, axisLabel: { formatter: fromOne }, splitLine },
    yAxis: { type: "category", data: names, inverse: true, axisTick: { show: false }, axisLabel: { width: 160, overflow: "truncate" } },
    series: [
      {
        type: "bar",
        name: "λ",
        barMaxWidth: 22,
        data: lambdas.map((l, k) => ({ value: l === null ? null : l - 1, itemStyle: { color: k === 0 ? INK : l !== null && l >= 1 ? SPRUCE : CLAY } })),
        label: { show: true, position: "right", formatter: (p: { value: number | null }) => (p.value === null ? "—" : (1 + p.value).toFixed(4)), color: INK, fontFamily: FONT },
        markLine: { symbol: "none", silent: true, lineStyle: { color: INK, type: "dashed" }, label: { formatter: "λ = 1", color: INK }, data: [{ xAxis: 0 }] },
      },
    ],
  };
  return <Chart option={option} height={Math.min(560, 70 + 34 * names.length)} ariaLabel={ariaLabel} />;
}

export interface TornadoRow {
  label: string;
  down: number | null;
  up: number | null;
}

/** Exact Δλ for the same relative change down (left) and up (right), largest effect on top. */
export function Tornado({ rows, percent, ariaLabel }: { rows: TornadoRow[]; percent: string; ariaLabel: string }) {
  const option = {
    textStyle,
    animation: false,
    legend: { top: 0, textStyle },
    grid: { left: 8, right: 56, top: 32, bottom: 40, containLabel: true },
    tooltip: { trigger: "axis", axisPointer: { type: "shadow" }, valueFormatter: fmt },
    xAxis: { type: "value", name: "Exact change in λ", nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
    yAxis: { type: "category", data: rows.map((r) => r.label), inverse: true, axisTick: { show: false }, axisLabel: { width: 170, overflow: "truncate" } },
    series: [
      { type: "bar", name: `−${percent}`, stack: "t", data: rows.map((r) => r.down), itemStyle: { color: CLAY }, barMaxWidth: 20 },
      { type: "bar", name: `+${percent}`, stack: "t", data: rows.map((r) => r.up), itemStyle: { color: SPRUCE, decal: { symbol: "rect", dashArrayX: [1, 0], dashArrayY: [2, 3], rotation: 0.8, color: "rgba(255,255,255,0.35)" } }, barMaxWidth: 20 },
    ],
  };
  return <Chart option={option} height={Math.min(720, 90 + 28 * rows.length)} ariaLabel={ariaLabel} />;
}

/** LTRE contributions c_ij as a diverging heatmap: clay for negative, spruce for positive, paper at 0. */
export function ContributionHeatmap({ stageNames, contributions, ariaLabel }: { stageNames: string[]; contributions: number[][]; ariaLabel: string }) {
  let max = 0;
  for (const row of contributions) for (const c of row) max = Math.max(max, Math.abs(c));
  // Dark cells get light labels (text contrast).
  const data: { value: [number, number, number | "-"]; label?: { color: string } }[] = [];
  contributions.forEach((row, i) =>
    row.forEach((c, j) => data.push({ value: [j, i, c === 0 ? "-" : c], ...(max > 0 && Math.abs(c) > 0.55 * max ? { label: { color: "#ffffff" } } : {}) })),
  );
  const n = stageNames.length;
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 16, top: 28, bottom: 96, containLabel: true },
    tooltip: { formatter: (p: { value: [number, number, number | "-"] }) => `${stageNames[p.value[0]]} → ${stageNames[p.value[1]]}: ${p.value[2] === "-" ? "no difference" : fmt(p.value[2])}` },
    xAxis: { type: "category", data: stageNames, name: "From stage (at t)", nameLocation: "middle", nameGap: 28, nameTextStyle: axisName, axisLabel: { rotate: n > 6 ? 30 : 0, width: 90, overflow: "truncate" } },
    yAxis: { type: "category", data: stageNames, inverse: true, name: "To stage (at t+1)", nameLocation: "start", nameTextStyle: axisName },
    visualMap: {
      min: -(max || 1),
      max: max || 1,
      calculable: false,
      orient: "horizontal",
      left: "center",
      bottom: 0,
      text: ["raises λ", "lowers λ"],
      inRange: { color: [CLAY, PAPER, SPRUCE] },
      textStyle,
    },
    series: [{ type: "heatmap", data, label: { show: n <= 10, formatter: (p: { value: [number, number, number | "-"] }) => (p.value[2] === "-" ? "" : formatNumber(p.value[2], 2)), color: INK, fontSize: 11 } }],
  };
  return <Chart option={option} height={Math.min(660, 170 + 44 * n)} ariaLabel={ariaLabel} />;
}

/** Contributions as horizontal bars (negative left in clay, positive right in spruce). */
export function ContributionBars({ labels, values, ariaLabel }: { labels: string[]; values: number[]; ariaLabel: string }) {
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 64, top: 8, bottom: 40, containLabel: true },
    tooltip: { trigger: "axis", axisPointer: { type: "shadow" }, valueFormatter: fmt },
    xAxis: { type: "value", name: "Contribution to the difference in λ", nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
    yAxis: { type: "category", data: labels, inverse: true, axisTick: { show: false }, axisLabel: { width: 170, overflow: "truncate" } },
    series: [
      {
        type: "bar",
        barMaxWidth: 20,
        data: values.map((v) => ({ value: v, itemStyle: { color: v < 0 ? CLAY : v > 0 ? SPRUCE : INDIGO } })),
        label: { show: labels.length <= 24, position: "right", formatter: (p: { value: number }) => formatNumber(p.value, 3), color: INK, fontFamily: FONT },
      },
    ],
  };
  return <Chart option={option} height={Math.min(720, 70 + 28 * labels.length)} ariaLabel={ariaLabel} />;
}
