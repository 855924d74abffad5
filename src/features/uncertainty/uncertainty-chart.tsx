/**
 * The distribution of λ over the Monte Carlo draws, as a histogram on
 * ECharts (bar charts only, loaded with the chart). Bins below 1 are clay,
 * the others spruce; the tooltip says "declining" too, and a dashed line marks λ = 1.
 */
import { BarChart } from "echarts/charts";
import { GridComponent, MarkLineComponent, TooltipComponent } from "echarts/components";
import * as echarts from "echarts/core";
import { Chart, INK, SPRUCE, CLAY, textStyle, axisName, splitLine } from "../../components/ui/chart";
import type { UncertaintyRunResult } from "../../api/runs";
import { formatPercent } from "../../lib/number-format";

echarts.use([BarChart, GridComponent, MarkLineComponent, TooltipComponent]);

export function LambdaHistogramChart({ result }: { result: UncertaintyRunResult }) {
  const { edges, counts } = result.lambdaHistogram;
  const width = (edges[1] ?? 0) - (edges[0] ?? 0);
  const digits = width > 0 ? Math.min(6, Math.max(2, 1 - Math.floor(Math.log10(width)))) : 4;
  const labels = counts.map((_, k) => (((edges[k] ?? 0) + (edges[k + 1] ?? 0)) / 2).toFixed(digits));
  const below = counts.map((_, k) => (edges[k + 1] ?? 0) <= 1);
  // The category where λ = 1 falls, if inside the range.
  const oneAt = edges.findIndex((e, k) => k < counts.length && e <= 1 && (edges[k + 1] ?? -Infinity) > 1);
  const option = {
    textStyle,
    animation: false,
    grid: { left: 8, right: 16, top: 24, bottom: 44, containLabel: true },
    tooltip: {
      trigger: "axis",
      axisPointer: { type: "shadow" },
      formatter: (params: unknown) => {
        const k = ((Array.isArray(params) ? params : [params]) as { dataIndex: number }[])[0]?.dataIndex ?? 0;
        const c = counts[k] ?? 0;
        return `λ from ${(edges[k] ?? 0).toFixed(digits)} to ${(edges[k + 1] ?? 0).toFixed(digits)}${below[k] ? " (declining)" : ""}<br/>${c.toLocaleString("en")} draws (${formatPercent(c / result.draws)})`;
      },
    },
    xAxis: { type: "category", data: labels, name: "λ", nameLocation: "middle", nameGap: 28, nameTextStyle: axisName, axisLabel: { hideOverlap: true } },
    yAxis: { type: "value", name: "draws", nameTextStyle: { ...axisName, align: "left" }, splitLine },
    series: [
      {
        type: "bar",
        barCategoryGap: "8%",
        data: counts.map((c, k) => ({ value: c, itemStyle: { color: below[k] ? CLAY : SPRUCE } })),
        ...(oneAt >= 0
          ? { markLine: { symbol: "none", silent: true, lineStyle: { color: INK, type: "dashed", width: 1.5 }, label: { formatter: "λ = 1", color: INK }, data: [{ xAxis: oneAt }] } }
          : {}),
      },
    ],
  };
  return (
    <Chart option={option} ariaLabel={`Histogram of λ over ${result.draws.toLocaleString("en")} draws: ${formatPercent(result.lambda.probabilityBelowOne)} of them below 1.`} height={300} />
  );
}
