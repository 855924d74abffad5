/**
 * The Results charts on ECharts: bars for w and v, a paper-to-spruce heatmap
 * for elasticities, lines for a projection. Only the pieces used are
 * registered, and this module is loaded on demand (see results-panel.tsx),
 * so ECharts stays out of the editor's first load.
 */
import { BarChart, HeatmapChart, LineChart } from "echarts/charts";
import { GridComponent, LegendComponent, TooltipComponent, VisualMapComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { Chart, INK, PAPER, SPRUCE, CLAY, INDIGO, GRID_LINE, FONT, textStyle, axisName, splitLine, fmt } from "../../components/ui/chart";
import { formatNumber } from "../../lib/number-format";

echarts.use([BarChart, HeatmapChart, LineChart, GridComponent, LegendComponent, TooltipComponent, VisualMapComponent]);

export interface StageBarsProps {
  stageNames: readonly string[];
  values: readonly number[];
  /** The value axis's name, with its unit or scale. */
  valueLabel: string;
  color?: "spruce" | "indigo";
  /** Accessible description of the chart (the table beside it has the numbers). */
  ariaLabel: string;
}

/** Horizontal bars, one per stage, in stage order from the top. */
export function StageBars({ stageNames, values, valueLabel, color = "spruce", ariaLabel }: StageBarsProps) {
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 48, top: 8, bottom: 40, containLabel: true },
    tooltip: { trigger: "axis", axisPointer: { type: "shadow" }, valueFormatter: fmt },
    xAxis: { type: "value", name: valueLabel, nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
    yAxis: { type: "category", data: stageNames, inverse: true, axisTick: { show: false }, axisLabel: { width: 140, overflow: "truncate" } },
    series: [
      {
        type: "bar",
        data: values,
        itemStyle: { color: color === "spruce" ? SPRUCE : INDIGO },
        barMaxWidth: 22,
        label: { show: stageNames.length <= 20, position: "right", formatter: (p: { value: number }) => formatNumber(p.value, 3), color: INK, fontFamily: FONT },
      },
    ],
  };
  return (
    <Chart option={option} ariaLabel={ariaLabel} height={Math.min(720, 64 + 30 * stageNames.length)} />
  );
}

export interface ElasticityHeatmapProps {
  stageNames: readonly string[];
  /** e_ij, row = to, column = from. */
  elasticity: readonly (readonly number[])[];
  structuralZero: readonly (readonly boolean[])[];
  ariaLabel: string;
}

/** Elasticities as a heatmap from paper (0) to spruce (the largest); structural zeros are left blank. */
export function ElasticityHeatmap({ stageNames, elasticity, structuralZero, ariaLabel }: ElasticityHeatmapProps) {
  const n = stageNames.length;
  let max = 0;
  for (const row of elasticity) for (const e of row) max = Math.max(max, e);
  // Dark cells get light labels (text contrast), as the Matrix shading does.
  const data: { value: [number, number, number | "-"]; label?: { color: string } }[] = [];
  elasticity.forEach((row, i) =>
    row.forEach((e, j) => {
      const zero = structuralZero[i]?.[j] ?? false;
      data.push({ value: [j, i, zero ? "-" : e], ...(max > 0 && !zero && e / max > 0.55 ? { label: { color: "#ffffff" } } : {}) });
    }),
  );
  const option = {
    textStyle,
    animation: false,
    grid: { left: 150, right: 16, top: 8, bottom: 72 + (n > 6 ? 50 : 0) },
    tooltip: {
      formatter: (p: { value: [number, number, number | "-"] }) => {
        const [j, i, e] = p.value;
        return `from ${stageNames[j]} to ${stageNames[i]}: ${e === "-" ? "structural zero (no arrow)" : `elasticity ${formatNumber(e, 4)}`}`;
      },
    },
    xAxis: {
      type: "category",
      data: stageNames,
      name: "from (stage at t)",
      nameLocation: "middle",
      nameGap: n > 6 ? 70 : 28,
      nameTextStyle: axisName,
      position: "bottom",
      axisLabel: { interval: 0, rotate: n > 6 ? 30 : 0, width: 110, overflow: "truncate" },
      splitArea: { show: false },
    },
    yAxis: {
      type: "category",
      data: stageNames,
      inverse: true,
      name: "to (stage at t+1)",
      nameLocation: "middle",
      nameGap: 132,
      nameRotate: 90,
      nameTextStyle: axisName,
      axisLabel: { interval: 0, width: 118, overflow: "truncate" },
    },
    visualMap: {
      min: 0,
      max: max > 0 ? max : 1,
      calculable: false,
      orient: "horizontal",
      left: "center",
      bottom: 0,
      itemWidth: 12,
      itemHeight: 160,
      text: [formatNumber(max, 2), "0"],
      textStyle,
      inRange: { color: [PAPER, SPRUCE] },
    },
    series: [
      {
        type: "heatmap",
        data,
        itemStyle: { borderColor: GRID_LINE, borderWidth: 1 },
        label: {
          show: n <= 12,
          fontFamily: FONT,
          formatter: (p: { value: [number, number, number | "-"] }) => (p.value[2] === "-" ? "" : formatNumber(p.value[2], 2)),
          color: INK,
        },
        emphasis: { itemStyle: { borderColor: INK, borderWidth: 2 } },
      },
    ],
  };
  const size = Math.min(760, 150 + 46 * n) + (n > 6 ? 50 : 0);
  return (
    <Chart option={option} ariaLabel={ariaLabel} height={size} style={{ maxWidth: size + 160 }} />
  );
}

export interface ProjectionChartProps {
  stageNames: readonly string[];
  /** population[t][i] */
  population: readonly (readonly number[])[];
  total: readonly number[];
  logScale: boolean;
  timeStepUnit: string;
  ariaLabel: string;
}

const STAGE_COLOURS = [SPRUCE, INDIGO, CLAY, "#7a8c3a", "#6b4f7a", "#3f7f9c", "#8a6a3a", "#5a5a5a"];

/** Numbers over time: the total (thick) and each stage; zeros are gaps on a log scale. */
export function ProjectionChart({ stageNames, population, total, logScale, timeStepUnit, ariaLabel }: ProjectionChartProps) {
  const steps = total.map((_, t) => t);
  const clean = (v: number) => (logScale && !(v > 0) ? null : v);
  const showStages = stageNames.length <= 12;
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 24, top: 40, bottom: 40, containLabel: true },
    legend: { top: 0, type: "scroll", textStyle },
    tooltip: { trigger: "axis", valueFormatter: (v: unknown) => (v === null || v === undefined ? "0" : fmt(v)) },
    xAxis: { type: "category", data: steps, name: `time (${timeStepUnit}s from now)`, nameLocation: "middle", nameGap: 26, nameTextStyle: axisName, boundaryGap: false },
    yAxis: {
      type: logScale ? "log" : "value",
      name: logScale ? "individuals (log scale)" : "individuals",
      // Left-aligned over the axis, so the name is never cut at the chart's edge.
      nameTextStyle: { ...axisName, align: "left" },
      axisLabel: { formatter: fmt },
      splitLine,
    },
    series: [
      { name: "Total", type: "line", data: total.map(clean), showSymbol: false, lineStyle: { width: 3, color: INK }, itemStyle: { color: INK } },
      ...(showStages
        ? stageNames.map((name, i) => ({
            name,
            type: "line",
            data: population.map((row) => clean(row[i] ?? 0)),
            showSymbol: false,
            lineStyle: { width: 1.5, color: STAGE_COLOURS[i % STAGE_COLOURS.length], type: i >= STAGE_COLOURS.length ? "dashed" : "solid" },
            itemStyle: { color: STAGE_COLOURS[i % STAGE_COLOURS.length] },
          }))
        : []),
    ],
  };
  return (
    <Chart option={option} ariaLabel={ariaLabel} height={340} />
  );
}
