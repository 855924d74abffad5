/**
 * The Climate charts on ECharts (loaded with the tab): a response over
 * temperature, λ(T) with the persistence window shaded, measurements with a
 * fitted curve and its residuals, and N(t) above the temperature series.
 * Only the pieces used are registered.
 */
import { LineChart, ScatterChart } from "echarts/charts";
import { GridComponent, LegendComponent, MarkAreaComponent, MarkLineComponent, TooltipComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { Chart, INK, SPRUCE, CLAY, INDIGO, OCHRE, textStyle, axisName, splitLine, fmt } from "../../components/ui/chart";
import { formatNumber } from "../../lib/number-format";

echarts.use([LineChart, ScatterChart, GridComponent, LegendComponent, MarkAreaComponent, MarkLineComponent, TooltipComponent]);

const grid = { left: 12, right: 24, top: 36, bottom: 44, containLabel: true };
const xTemperature = (min?: number, max?: number) => ({
  type: "value",
  name: "Temperature (°C)",
  nameLocation: "middle",
  nameGap: 28,
  nameTextStyle: axisName,
  min,
  max,
  splitLine,
});

export function ResponsePreviewChart({ temperatures, values, label, optimum, ariaLabel }: { temperatures: number[]; values: number[]; label: string; optimum: number | null; ariaLabel: string }) {
  const option = {
    textStyle,
    animation: false,
    grid,
    tooltip: { trigger: "axis", valueFormatter: fmt },
    xAxis: xTemperature(temperatures[0], temperatures[temperatures.length - 1]),
    yAxis: { type: "value", name: label, nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
    series: [
      {
        type: "line",
        name: label,
        showSymbol: false,
        data: temperatures.map((t, i) => [t, values[i]]),
        lineStyle: { color: SPRUCE, width: 2 },
        itemStyle: { color: SPRUCE },
        markLine:
          optimum === null
            ? undefined
            : { symbol: "none", label: { formatter: `optimum ${formatNumber(optimum, 4)} °C`, color: INK }, lineStyle: { color: INDIGO, type: "dashed" }, data: [{ xAxis: optimum }] },
      },
    ],
  };
  return <Chart option={option} height={240} ariaLabel={ariaLabel} />;
}

export interface LambdaChartProps {
  temperatures: number[];
  lambda: number[];
  window: { from: number; to: number }[];
  optimum: { temperature: number; lambda: number } | null;
  rates: { name: string; values: number[] }[];
  ariaLabel: string;
}

/** λ(T) with λ = 1 marked and the persistence window(s) shaded; the thermal rates on a second panel. */
export function LambdaChart({ temperatures, lambda, window, optimum, rates, ariaLabel }: LambdaChartProps) {
  const min = temperatures[0];
  const max = temperatures[temperatures.length - 1];
  const palette = [CLAY, INDIGO, OCHRE, SPRUCE, INK];
  const option = {
    textStyle,
    animation: false,
    legend: { top: 0, textStyle },
    grid: [
      { left: 60, right: 24, top: 36, height: 220 },
      { left: 60, right: 24, top: 320, height: 150 },
    ],
    tooltip: { trigger: "axis", valueFormatter: fmt },
    axisPointer: { link: [{ xAxisIndex: "all" }] },
    xAxis: [
      { ...xTemperature(min, max), gridIndex: 0, name: "" },
      { ...xTemperature(min, max), gridIndex: 1 },
    ],
    yAxis: [
      { type: "value", gridIndex: 0, name: "λ (per time step)", nameTextStyle: axisName, scale: true, axisLabel: { formatter: fmt }, splitLine },
      { type: "value", gridIndex: 1, name: "Vital rate", nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
    ],
    series: [
      {
        type: "line",
        name: "λ",
        xAxisIndex: 0,
        yAxisIndex: 0,
        showSymbol: false,
        data: temperatures.map((t, i) => [t, lambda[i]]),
        lineStyle: { color: SPRUCE, width: 2.5 },
        itemStyle: { color: SPRUCE },
        markArea: {
          silent: true,
          itemStyle: { color: "rgba(47, 107, 90, 0.14)" },
          label: { show: true, position: "insideTop", color: SPRUCE, formatter: "λ ≥ 1" },
          data: window.map((w) => [{ xAxis: w.from }, { xAxis: w.to }]),
        },
        markLine: {
          symbol: "none",
          silent: true,
          data: [
            { yAxis: 1, lineStyle: { color: INK, type: "dashed" }, label: { formatter: "λ = 1", color: INK } },
            ...(optimum ? [{ xAxis: optimum.temperature, lineStyle: { color: INDIGO, type: "dotted" }, label: { formatter: `optimum ${formatNumber(optimum.temperature, 4)} °C`, color: INDIGO } }] : []),
          ],
        },
      },
      ...rates.map((r, k) => ({
        type: "line",
        name: r.name,
        xAxisIndex: 1,
        yAxisIndex: 1,
        showSymbol: false,
        data: temperatures.map((t, i) => [t, r.values[i]]),
        lineStyle: { color: palette[k % palette.length], width: 2, type: k % 2 ? "dashed" : "solid" },
        itemStyle: { color: palette[k % palette.length] },
      })),
    ],
  };
  return <Chart option={option} height={520} ariaLabel={ariaLabel} />;
}

export function FitChart({ temperatures, values, curve, residuals, label }: { temperatures: number[]; values: number[]; curve: { temperatures: number[]; values: number[] }; residuals: number[]; label: string }) {
  const option = {
    textStyle,
    animation: false,
    grid: [
      { left: 60, right: 24, top: 30, height: 200 },
      { left: 60, right: 24, top: 290, height: 110 },
    ],
    tooltip: { trigger: "item", valueFormatter: fmt },
    xAxis: [
      { ...xTemperature(), gridIndex: 0, name: "", scale: true },
      { ...xTemperature(), gridIndex: 1, scale: true },
    ],
    yAxis: [
      { type: "value", gridIndex: 0, name: label, nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
      { type: "value", gridIndex: 1, name: "Residual", nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
    ],
    series: [
      { type: "scatter", name: "Measured", xAxisIndex: 0, yAxisIndex: 0, data: temperatures.map((t, i) => [t, values[i]]), itemStyle: { color: INK }, symbolSize: 7 },
      { type: "line", name: "Fitted", xAxisIndex: 0, yAxisIndex: 0, showSymbol: false, data: curve.temperatures.map((t, i) => [t, curve.values[i]]), lineStyle: { color: SPRUCE, width: 2 } },
      {
        type: "scatter",
        name: "Residual",
        xAxisIndex: 1,
        yAxisIndex: 1,
        data: temperatures.map((t, i) => [t, residuals[i]]),
        itemStyle: { color: CLAY },
        symbol: "diamond",
        symbolSize: 8,
        markLine: { symbol: "none", silent: true, data: [{ yAxis: 0 }], lineStyle: { color: INK, type: "dashed" }, label: { show: false } },
      },
    ],
  };
  return <Chart option={option} height={420} ariaLabel={`Measured ${label} against temperature with the fitted curve, and the residuals below`} />;
}

export interface TrajectoryChartProps {
  years: number[];
  /** N at the start of each year and after the last (years + 1 values). */
  total: number[];
  temperatures: number[];
  /** Optional band of replicate quantiles: 5 %, 50 %, 95 % of N(t). */
  band?: { low: number[]; median: number[]; high: number[] };
  firstYearBelowOne: number | null;
  timeStepUnit: string;
  ariaLabel: string;
}

/** N(t) (log scale) above the temperature series. */
export function TrajectoryChart({ years, total, temperatures, band, firstYearBelowOne, timeStepUnit, ariaLabel }: TrajectoryChartProps) {
  const times = [...years, (years[years.length - 1] ?? 0) + 1];
  const series: object[] = [
    {
      type: "line",
      name: band ? "Without year-to-year noise" : "N(t)",
      xAxisIndex: 0,
      yAxisIndex: 0,
      showSymbol: false,
      data: times.map((y, i) => [y, total[i]]),
      lineStyle: { color: SPRUCE, width: 2.5 },
      itemStyle: { color: SPRUCE },
      markLine:
        firstYearBelowOne === null
          ? undefined
          : { symbol: "none", silent: true, data: [{ xAxis: firstYearBelowOne }], lineStyle: { color: CLAY, type: "dashed" }, label: { formatter: `λ below 1 from ${firstYearBelowOne}`, color: CLAY } },
    },
  ];
  if (band) {
    series.push(
      { type: "line", name: "Median of replicates", xAxisIndex: 0, yAxisIndex: 0, showSymbol: false, data: times.map((y, i) => [y, band.median[i]]), lineStyle: { color: INDIGO, width: 2, type: "dashed" }, itemStyle: { color: INDIGO } },
      { type: "line", name: "5 % of replicates", xAxisIndex: 0, yAxisIndex: 0, showSymbol: false, data: times.map((y, i) => [y, band.low[i]]), lineStyle: { color: INDIGO, width: 1, type: "dotted" }, itemStyle: { color: INDIGO } },
      { type: "line", name: "95 % of replicates", xAxisIndex: 0, yAxisIndex: 0, showSymbol: false, data: times.map((y, i) => [y, band.high[i]]), lineStyle: { color: INDIGO, width: 1, type: "dotted" }, itemStyle: { color: INDIGO } },
    );
  }
  series.push({ type: "line", name: "Temperature", xAxisIndex: 1, yAxisIndex: 1, showSymbol: false, data: years.map((y, i) => [y, temperatures[i]]), lineStyle: { color: OCHRE, width: 2 }, itemStyle: { color: OCHRE } });
  const option = {
    textStyle,
    animation: false,
    legend: { top: 0, textStyle },
    grid: [
      { left: 70, right: 24, top: 40, height: 230 },
      { left: 70, right: 24, top: 330, height: 110 },
    ],
    tooltip: { trigger: "axis", valueFormatter: fmt },
    axisPointer: { link: [{ xAxisIndex: "all" }] },
    xAxis: [
      { type: "value", gridIndex: 0, min: times[0], max: times[times.length - 1], splitLine, axisLabel: { formatter: (v: number) => String(v) } },
      { type: "value", gridIndex: 1, min: times[0], max: times[times.length - 1], name: `Year (one ${timeStepUnit} per step)`, nameLocation: "middle", nameGap: 28, nameTextStyle: axisName, splitLine, axisLabel: { formatter: (v: number) => String(v) } },
    ],
    yAxis: [
      { type: "log", gridIndex: 0, name: "Individuals (log scale)", nameTextStyle: axisName, axisLabel: { formatter: fmt }, splitLine },
      { type: "value", gridIndex: 1, name: "°C", nameTextStyle: axisName, scale: true, splitLine },
    ],
    series,
  };
  return <Chart option={option} height={480} ariaLabel={ariaLabel} />;
}
