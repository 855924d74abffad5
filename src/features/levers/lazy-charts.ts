// The charts load on demand, so ECharts stays out of the editor's first load.
import { lazy } from "react";

export const LambdaBars = lazy(() => import("./levers-charts").then((m) => ({ default: m.LambdaBars })));
export const Tornado = lazy(() => import("./levers-charts").then((m) => ({ default: m.Tornado })));
export const ContributionHeatmap = lazy(() => import("./levers-charts").then((m) => ({ default: m.ContributionHeatmap })));
export const ContributionBars = lazy(() => import("./levers-charts").then((m) => ({ default: m.ContributionBars })));
