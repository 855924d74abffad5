/** A warming trajectory in words, as the Climate tab and the report write it. */
import { formatNumber } from "../format/number-format";
import type { WarmingTrajectory } from "../lifecycle/thermal";

export function describeTrajectory(t: WarmingTrajectory | undefined): string {
  if (!t) return "—";
  if (t.kind === "trend") return `${t.years} years from ${t.startYear}, baseline ${formatNumber(t.baseline, 4)} °C, ${t.trendPerDecade >= 0 ? "+" : "−"}${formatNumber(Math.abs(t.trendPerDecade), 3)} °C per decade, year-to-year SD ${formatNumber(t.sd, 3)} °C`;
  return `an uploaded series of ${t.points.length} years (${t.points[0]!.year}–${t.points[t.points.length - 1]!.year}), year-to-year SD ${formatNumber(t.sd ?? 0, 3)} °C`;
}
