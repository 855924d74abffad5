/**
 * One ECharts figure as Stagewright draws it: the SVG renderer, the palette
 * and type of the design, and a role="img" wrapper whose label says in words
 * what the chart shows. Each feature registers only the chart types and
 * components it uses (echarts.use) in its own lazily loaded chart module, so
 * ECharts stays out of the first load; this file registers the renderer.
 */
import ReactEChartsCore from "echarts-for-react/esm/core";
import * as echarts from "echarts/core";
import { SVGRenderer } from "echarts/renderers";
import type { CSSProperties } from "react";
import { INK } from "../../../shared/diagram/palette";
import { formatNumber } from "../../lib/number-format";

echarts.use([SVGRenderer]);

export { CLAY, INDIGO, INK, PAPER, SPRUCE } from "../../../shared/diagram/palette";
/** A second accent for a fourth series (the stage colour "Ochre"). */
export const OCHRE = "#a87a12";
/** Grid lines and empty bars. */
export const GRID_LINE = "#d9d6cf";
export const FONT = '"Atkinson Hyperlegible", ui-sans-serif, system-ui, sans-serif';
export const textStyle = { color: INK, fontFamily: FONT, fontSize: 12 };
export const axisName = { color: INK, fontFamily: FONT, fontSize: 12, fontWeight: "bold" as const };
export const splitLine = { lineStyle: { color: GRID_LINE } };
/** Tooltip and axis numbers: four significant digits. */
export const fmt = (v: unknown) => (typeof v === "number" ? formatNumber(v, 4) : String(v));

export function Chart({ option, ariaLabel, height = 300, style }: { option: object; ariaLabel: string; height?: number; style?: CSSProperties }) {
  return (
    <div role="img" aria-label={ariaLabel}>
      <ReactEChartsCore echarts={echarts} option={option} notMerge opts={{ renderer: "svg" }} style={{ height, width: "100%", ...style }} />
    </div>
  );
}
