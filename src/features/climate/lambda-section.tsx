/**
 * λ(T) of the editor's current document over a range the person chooses:
 * the curve with the persistence window (λ ≥ 1) shaded, its edges found by
 * root-finding on the server, the optimum and dλ/dT at a chosen temperature.
 */
import { lazy, Suspense, useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import { DEFAULT_CLIMATE_RANGE, MAX_TEMPERATURE, MAX_TEMPERATURE_SPAN, MIN_TEMPERATURE, temperatureRangeProblems, type TemperatureRange } from "../../../shared/lifecycle/thermal";
import { useClimateLambda } from "../../api/climate";
import { Alert } from "../../components/ui/alert";
import { Loading } from "../../components/ui/spinner";
import { formatLambda, formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";

const LambdaChart = lazy(() => import("./charts").then((m) => ({ default: m.LambdaChart })));

const t = (v: number) => `${formatNumber(v, 4)} °C`;

function readRange(minText: string, maxText: string): { range: TemperatureRange | null; error: string | null } {
  const min = parseNumberInput(minText);
  const max = parseNumberInput(maxText);
  if (min === null || max === null) return { range: null, error: "Type both temperatures as numbers." };
  if (min < MIN_TEMPERATURE || max > MAX_TEMPERATURE) return { range: null, error: `Temperatures lie between ${MIN_TEMPERATURE} and ${MAX_TEMPERATURE} °C.` };
  const problem = temperatureRangeProblems({ min, max })[0];
  if (problem) return { range: null, error: problem.message };
  return { range: { min, max }, error: null };
}

export function LambdaSection({ document: doc, readOnly, onRangeChange }: { document: LifeCycle; readOnly: boolean; onRangeChange: (range: TemperatureRange) => void }) {
  const saved = doc.climate?.range ?? DEFAULT_CLIMATE_RANGE;
  const [minText, setMinText] = useState(String(saved.min));
  const [maxText, setMaxText] = useState(String(saved.max));
  const [atText, setAtText] = useState("");
  const { range, error } = readRange(minText, maxText);
  const at = atText.trim() === "" ? undefined : (parseNumberInput(atText) ?? undefined);
  const atError = atText.trim() !== "" && (at === undefined || at < MIN_TEMPERATURE || at > MAX_TEMPERATURE) ? `Type a temperature between ${MIN_TEMPERATURE} and ${MAX_TEMPERATURE} °C.` : null;
  const query = useClimateLambda(doc, range, atError ? undefined : at);
  const data = query.data;
  const commitRange = () => {
    if (range && !readOnly && (range.min !== saved.min || range.max !== saved.max)) onRangeChange(range);
  };
  const thermalCount = doc.rates.filter((r) => r.thermal).length;

  return (
    <div className="space-y-3">
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="climate-range-min" className="block font-bold">
            From (°C)
          </label>
          <input id="climate-range-min" inputMode="decimal" value={minText} onChange={(e) => setMinText(e.target.value)} onBlur={commitRange} className="w-28 rounded-md border border-ink/40 bg-white px-3 py-2" />
        </div>
        <div>
          <label htmlFor="climate-range-max" className="block font-bold">
            To (°C)
          </label>
          <input id="climate-range-max" inputMode="decimal" value={maxText} onChange={(e) => setMaxText(e.target.value)} onBlur={commitRange} className="w-28 rounded-md border border-ink/40 bg-white px-3 py-2" />
        </div>
        <div>
          <label htmlFor="climate-slope-at" className="block font-bold">
            Slope dλ/dT at (°C)
          </label>
          <input id="climate-slope-at" inputMode="decimal" placeholder="window middle" value={atText} onChange={(e) => setAtText(e.target.value)} className="w-36 rounded-md border border-ink/40 bg-white px-3 py-2" />
        </div>
        {query.isFetching && <Loading label="Computing λ(T)…" />}
      </div>
      {error && <p className="text-sm font-bold text-brick">✕ {error} (at most {MAX_TEMPERATURE_SPAN} °C wide)</p>}
      {atError && <p className="text-sm font-bold text-brick">✕ {atError}</p>}
      {thermalCount === 0 && <Alert tone="info">No vital rate has a thermal response yet, so λ does not change with temperature. Attach one above.</Alert>}
      {query.error && (
        <Alert tone="error" title="λ(T) cannot be computed">
          {query.error.message}
        </Alert>
      )}
      {data && (
        <>
          <div className="grid gap-3 sm:grid-cols-3" aria-live="polite">
            <div className="rounded-md border border-ink/15 p-3">
              <div className="text-sm text-ink/75">Persistence window (λ ≥ 1)</div>
              <div className="text-lg font-bold" data-testid="climate-window">
                {data.window.length === 0
                  ? "none in this range"
                  : data.window.map((w) => `${w.lower ? t(w.lower.temperature) : `below ${t(w.from)}`} – ${w.upper ? t(w.upper.temperature) : `above ${t(w.to)}`}`).join("; ")}
              </div>
              {data.window.some((w) => !w.lower || !w.upper) && <div className="text-sm text-ink/75">The window runs past the end of the range; widen it to find that edge.</div>}
            </div>
            <div className="rounded-md border border-ink/15 p-3">
              <div className="text-sm text-ink/75">Optimum temperature</div>
              <div className="text-lg font-bold">{data.optimum ? `${t(data.optimum.temperature)}, λ = ${formatLambda(data.optimum.lambda)}` : "—"}</div>
              {data.optimum?.atBoundary && <div className="text-sm text-ink/75">At the end of the range: λ may rise further outside it.</div>}
            </div>
            <div className="rounded-md border border-ink/15 p-3">
              <div className="text-sm text-ink/75">Slope at {t(data.slope.temperature)}</div>
              <div className="text-lg font-bold">dλ/dT = {formatNumber(data.slope.slope, 3)} per °C</div>
              <div className="text-sm text-ink/75">λ there {formatLambda(data.slope.lambda)} per {data.timeStepUnit}</div>
            </div>
          </div>
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <LambdaChart
              temperatures={data.temperatures}
              lambda={data.lambda}
              window={data.window}
              optimum={data.optimum}
              rates={data.rates}
              ariaLabel={`λ from ${t(data.temperatures[0]!)} to ${t(data.temperatures[data.temperatures.length - 1]!)}, with the temperatures where λ is at least 1 shaded`}
            />
          </Suspense>
          {data.slope.contributions.length > 0 && (
            <table className="w-full text-sm">
              <caption className="text-left font-bold">Where the slope at {t(data.slope.temperature)} comes from</caption>
              <thead>
                <tr className="border-b border-ink/20 text-left">
                  <th scope="col" className="px-2 py-1">Rate</th>
                  <th scope="col" className="px-2 py-1">Value</th>
                  <th scope="col" className="px-2 py-1">d rate / dT (per °C)</th>
                  <th scope="col" className="px-2 py-1">∂λ/∂rate</th>
                  <th scope="col" className="px-2 py-1">Part of dλ/dT</th>
                </tr>
              </thead>
              <tbody>
                {data.slope.contributions.map((c) => (
                  <tr key={c.rateId} className="border-b border-ink/10">
                    <th scope="row" className="px-2 py-1 text-left font-mono">{c.name}</th>
                    <td className="px-2 py-1">{formatNumber(c.value, 4)}</td>
                    <td className="px-2 py-1">{formatNumber(c.rateSlope, 3)}</td>
                    <td className="px-2 py-1">{formatNumber(c.sensitivity, 3)}</td>
                    <td className="px-2 py-1">{formatNumber(c.contribution, 3)}</td>
                  </tr>
                ))}
              </tbody>
            </table>
          )}
          {data.clamped.map((c) => (
            <Alert key={c.rateId} tone="warning" title={`${c.name} clamped to 1`}>
              {c.name} is a probability, but its response exceeds 1 from {t(c.from)} to {t(c.to)} (up to {formatNumber(c.worst, 3)}); there it is held at 1. Consider applying the
              response to a hazard.
            </Alert>
          ))}
        </>
      )}
    </div>
  );
}
