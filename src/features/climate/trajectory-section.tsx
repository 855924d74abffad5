/**
 * Warming trajectory: yearly temperatures built from a baseline, a trend per
 * decade and a year-to-year SD, or uploaded as CSV (year, °C). The
 * deterministic projection through the mean temperatures follows the form;
 * stochastic replicates (year-to-year noise) run as a warming Run on the
 * saved life cycle, with progress.
 */
import { lazy, Suspense, useState } from "react";
import { parseNumericPairs } from "../../../shared/climate/csv";
import type { LifeCycle } from "../../../shared/lifecycle";
import { trajectoryProblems, WarmingTrajectorySchema, type WarmingTrajectory } from "../../../shared/lifecycle/thermal";
import { useClimateTrajectory } from "../../api/climate";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Loading } from "../../components/ui/spinner";
import { formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";
import { WarmingRunSection } from "./warming-run";

const TrajectoryChart = lazy(() => import("./charts").then((m) => ({ default: m.TrajectoryChart })));

const DEFAULT_TREND = { kind: "trend", startYear: 2026, years: 80, baseline: 12, trendPerDecade: 0.3, sd: 0.8 } as const;

type TrendText = Record<"startYear" | "years" | "baseline" | "trendPerDecade" | "sd", string>;
const trendText = (t: Extract<WarmingTrajectory, { kind: "trend" }>): TrendText => ({
  startYear: String(t.startYear),
  years: String(t.years),
  baseline: String(t.baseline),
  trendPerDecade: String(t.trendPerDecade),
  sd: String(t.sd),
});

function readTrend(text: TrendText): { trajectory: WarmingTrajectory | null; errors: Record<string, string> } {
  const values: Record<string, unknown> = { kind: "trend" };
  const errors: Record<string, string> = {};
  for (const [k, v] of Object.entries(text)) {
    const n = parseNumberInput(v);
    if (n === null) errors[k] = "Type a number.";
    else values[k] = n;
  }
  if (Object.keys(errors).length) return { trajectory: null, errors };
  const parsed = WarmingTrajectorySchema.safeParse(values);
  if (!parsed.success) {
    for (const i of parsed.error.issues) errors[String(i.path[0])] ??= i.message;
    return { trajectory: null, errors };
  }
  return { trajectory: parsed.data, errors };
}

export interface TrajectorySectionProps {
  document: LifeCycle;
  lifeCycleId: string;
  readOnly: boolean;
  saved: boolean;
  onSaveTrajectory: (t: WarmingTrajectory) => void;
}

export function TrajectorySection({ document: doc, lifeCycleId, readOnly, saved, onSaveTrajectory }: TrajectorySectionProps) {
  const stored = doc.climate?.trajectory;
  const [mode, setMode] = useState<"trend" | "series">(stored?.kind ?? "trend");
  const [text, setText] = useState<TrendText>(trendText(stored?.kind === "trend" ? stored : DEFAULT_TREND));
  const [series, setSeries] = useState<{ name: string; trajectory: WarmingTrajectory | null; error: string | null } | null>(
    stored?.kind === "series" ? { name: "saved series", trajectory: stored, error: null } : null,
  );
  const [seriesSd, setSeriesSd] = useState(stored?.kind === "series" ? String(stored.sd ?? 0) : "0.8");
  const [initialText, setInitialText] = useState("1000");
  const trend = readTrend(text);
  const sdValue = parseNumberInput(seriesSd);
  const seriesTrajectory = series?.trajectory && sdValue !== null && sdValue >= 0 && sdValue <= 20 ? { ...series.trajectory, sd: sdValue } : null;
  const trajectory = mode === "trend" ? trend.trajectory : seriesTrajectory;
  const initial = parseNumberInput(initialText);
  const initialOk = initial !== null && initial > 0;
  const projection = useClimateTrajectory(doc, initialOk ? trajectory : null, initial ?? 1000);
  const p = projection.data;
  const same = trajectory !== null && JSON.stringify(trajectory) === JSON.stringify(stored);

  const onFile = async (file: File | undefined) => {
    if (!file) return setSeries(null);
    const parsed = parseNumericPairs(await file.text(), ["year", "temperature"]);
    if (!parsed.ok) return setSeries({ name: file.name, trajectory: null, error: parsed.issues.map((i) => i.message).join(" ") });
    const candidate = { kind: "series" as const, points: parsed.x.map((year, i) => ({ year, temperature: parsed.y[i]! })) };
    const checked = WarmingTrajectorySchema.safeParse(candidate);
    const problem = checked.success ? trajectoryProblems(checked.data)[0]?.message : `${checked.error.issues[0]!.path.join(".")}: ${checked.error.issues[0]!.message}`;
    setSeries({ name: file.name, trajectory: checked.success && !problem ? checked.data : null, error: problem ?? null });
  };
  const field = (key: keyof TrendText, label: string) => (
    <div>
      <label htmlFor={`climate-trend-${key}`} className="block font-bold">
        {label}
      </label>
      <input
        id={`climate-trend-${key}`}
        inputMode="decimal"
        value={text[key]}
        onChange={(e) => setText((t) => ({ ...t, [key]: e.target.value }))}
        aria-invalid={trend.errors[key] ? true : undefined}
        className={`w-32 rounded-md border bg-white px-3 py-2 ${trend.errors[key] ? "border-2 border-brick" : "border-ink/40"}`}
      />
      {trend.errors[key] && <p className="max-w-48 text-sm font-bold text-brick">✕ {trend.errors[key]}</p>}
    </div>
  );

  return (
    <div className="space-y-3">
      <fieldset className="flex flex-wrap gap-4">
        <legend className="sr-only">Where the temperatures come from</legend>
        <label className="inline-flex items-center gap-2">
          <input type="radio" checked={mode === "trend"} onChange={() => setMode("trend")} /> Baseline and trend
        </label>
        <label className="inline-flex items-center gap-2">
          <input type="radio" checked={mode === "series"} onChange={() => setMode("series")} /> Uploaded series (CSV: year, °C)
        </label>
      </fieldset>
      {mode === "trend" ? (
        <div className="flex flex-wrap items-start gap-3">
          {field("startYear", "First year")}
          {field("years", "Years")}
          {field("baseline", "Baseline (°C)")}
          {field("trendPerDecade", "Trend (°C per decade)")}
          {field("sd", "Year-to-year SD (°C)")}
        </div>
      ) : (
        <div className="flex flex-wrap items-end gap-3">
          <div>
            <label htmlFor="climate-series-file" className="block font-bold">
              Temperature series (CSV)
            </label>
            <input id="climate-series-file" type="file" accept=".csv,text/csv,text/plain" onChange={(e) => void onFile(e.target.files?.[0])} className="block text-sm" />
          </div>
          <div>
            <label htmlFor="climate-series-sd" className="block font-bold">
              Year-to-year SD for replicates (°C)
            </label>
            <input id="climate-series-sd" inputMode="decimal" value={seriesSd} onChange={(e) => setSeriesSd(e.target.value)} className="w-28 rounded-md border border-ink/40 bg-white px-3 py-2" />
          </div>
          {series?.error && (
            <Alert tone="error" title={`${series.name} cannot be used`}>
              {series.error}
            </Alert>
          )}
        </div>
      )}
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="climate-initial" className="block font-bold">
            Starting population (individuals, in the stable structure of the first year)
          </label>
          <input id="climate-initial" inputMode="decimal" value={initialText} onChange={(e) => setInitialText(e.target.value)} className="w-36 rounded-md border border-ink/40 bg-white px-3 py-2" />
          {!initialOk && <p className="text-sm font-bold text-brick">✕ Type a number above 0.</p>}
        </div>
        {!readOnly && (
          <Button variant="secondary" disabled={!trajectory || same} onClick={() => trajectory && onSaveTrajectory(trajectory)}>
            {same ? "Trajectory saved with the life cycle" : "Save trajectory with the life cycle"}
          </Button>
        )}
        {projection.isFetching && <Loading label="Projecting…" />}
      </div>
      {projection.error && (
        <Alert tone="error" title="The projection cannot be computed">
          {projection.error.message}
        </Alert>
      )}
      {p && (
        <>
          <p className="text-lg" aria-live="polite" data-testid="climate-first-year">
            {p.firstYearBelowOne === null ? (
              <>λ stays at or above 1 in every year of this trajectory (deterministic, mean temperatures).</>
            ) : (
              <>
                The annual λ first falls below 1 in <strong>{p.firstYearBelowOne}</strong> (mean temperature {formatNumber(p.temperatures[p.years.indexOf(p.firstYearBelowOne)], 3)} °C).
              </>
            )}{" "}
            N after {p.years.length} years: {formatNumber(p.total[p.total.length - 1], 4)} from {formatNumber(p.total[0], 4)}.
          </p>
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <TrajectoryChart
              years={p.years}
              total={p.total}
              temperatures={p.temperatures}
              firstYearBelowOne={p.firstYearBelowOne}
              timeStepUnit={p.timeStepUnit}
              ariaLabel={`Population size from ${p.years[0]} to ${p.years[p.years.length - 1]! + 1} above the yearly mean temperature`}
            />
          </Suspense>
        </>
      )}
      {trajectory && initialOk && <WarmingRunSection lifeCycleId={lifeCycleId} trajectory={trajectory} initialTotal={initial!} readOnly={readOnly} saved={saved} />}
    </div>
  );
}
