/**
 * Fitting a thermal response to measurements uploaded as CSV (temperature in
 * °C, value), by nonlinear least squares on the server: estimates with
 * standard errors, the residual plot, and the choice to attach the fitted
 * curve to a vital rate. Nothing is stored until it is attached.
 */
import { lazy, Suspense, useState } from "react";
import { FORM_LABELS } from "../../../shared/climate";
import { parseNumericPairs } from "../../../shared/climate/csv";
import type { LifeCycle } from "../../../shared/lifecycle";
import { THERMAL_FORMS, type ThermalForm, type ThermalResponse } from "../../../shared/lifecycle/thermal";
import { useFitThermalResponse } from "../../api/climate";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Loading } from "../../components/ui/spinner";
import { formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";

const FitChart = lazy(() => import("./charts").then((m) => ({ default: m.FitChart })));

export function FitSection({ document: doc, readOnly, onAttach }: { document: LifeCycle; readOnly: boolean; onAttach: (rateId: string, response: ThermalResponse) => void }) {
  const [csv, setCsv] = useState<{ name: string; text: string } | null>(null);
  const [csvError, setCsvError] = useState<string | null>(null);
  const [form, setForm] = useState<ThermalForm>("arrhenius");
  const [appliesTo, setAppliesTo] = useState<"rate" | "hazard">("rate");
  const [refText, setRefText] = useState("20");
  const [target, setTarget] = useState(doc.rates[0]?.id ?? "");
  const fit = useFitThermalResponse();
  const result = fit.data;
  const usesReference = form === "arrhenius" || form === "schoolfield";
  const ref = parseNumberInput(refText);

  const onFile = async (file: File | undefined) => {
    fit.reset();
    if (!file) return setCsv(null);
    const text = await file.text();
    const parsed = parseNumericPairs(text, ["temperature", "value"]);
    setCsvError(parsed.ok ? null : parsed.issues.map((i) => i.message).join(" "));
    setCsv({ name: file.name, text });
  };
  const run = () => csv && fit.mutate({ form, appliesTo, csv: csv.text, ...(usesReference && ref !== null ? { referenceTemperature: ref } : {}) });

  return (
    <div className="space-y-3">
      <p className="text-sm text-ink/80">
        A CSV of two columns: temperature (°C) and the measured rate (or hazard) at that temperature, one measurement per line, with an optional header line.
      </p>
      <div className="flex flex-wrap items-end gap-3">
        <div>
          <label htmlFor="climate-fit-file" className="block font-bold">
            Measurements (CSV)
          </label>
          <input id="climate-fit-file" type="file" accept=".csv,text/csv,text/plain" onChange={(e) => void onFile(e.target.files?.[0])} className="block text-sm" />
        </div>
        <div>
          <label htmlFor="climate-fit-form" className="block font-bold">
            Form
          </label>
          <select id="climate-fit-form" value={form} onChange={(e) => setForm(e.target.value as ThermalForm)} className="rounded-md border border-ink/40 bg-white px-3 py-2">
            {THERMAL_FORMS.map((f) => (
              <option key={f} value={f}>
                {FORM_LABELS[f]}
              </option>
            ))}
          </select>
        </div>
        <div>
          <label htmlFor="climate-fit-applies" className="block font-bold">
            The values are
          </label>
          <select id="climate-fit-applies" value={appliesTo} onChange={(e) => setAppliesTo(e.target.value as "rate" | "hazard")} className="rounded-md border border-ink/40 bg-white px-3 py-2">
            <option value="rate">the rate itself</option>
            <option value="hazard">hazards (per time step)</option>
          </select>
        </div>
        {usesReference && (
          <div>
            <label htmlFor="climate-fit-ref" className="block font-bold">
              Reference temperature (°C)
            </label>
            <input id="climate-fit-ref" inputMode="decimal" value={refText} onChange={(e) => setRefText(e.target.value)} className="w-24 rounded-md border border-ink/40 bg-white px-3 py-2" />
          </div>
        )}
        <Button onClick={run} disabled={!csv || csvError !== null || fit.isPending || (usesReference && ref === null)}>
          Fit
        </Button>
        {fit.isPending && <Loading label="Fitting…" />}
      </div>
      {csvError && (
        <Alert tone="error" title={`${csv?.name ?? "The file"} cannot be read`}>
          {csvError}
        </Alert>
      )}
      {fit.error && (
        <Alert tone="error" title="The fit was refused">
          {fit.error.message}
        </Alert>
      )}
      {result && (
        <div className="space-y-3">
          {result.converged ? (
            <Alert tone="success" title="The fit converged">
              {result.n} measurements, {result.p} parameters; residual SE {formatNumber(result.sigma, 3)}, {result.iterations} iterations.
            </Alert>
          ) : (
            <Alert tone="warning" title="The fit did not converge">
              {result.problem} The last estimate is shown below, without standard errors.
            </Alert>
          )}
          <table className="w-full text-sm">
            <caption className="text-left font-bold">{FORM_LABELS[result.form]}: estimates (SE from the Jacobian at the optimum)</caption>
            <thead>
              <tr className="border-b border-ink/20 text-left">
                <th scope="col" className="px-2 py-1">Parameter</th>
                <th scope="col" className="px-2 py-1">Estimate</th>
                <th scope="col" className="px-2 py-1">Standard error</th>
              </tr>
            </thead>
            <tbody>
              {result.estimates.map((e) => (
                <tr key={e.key} className="border-b border-ink/10">
                  <th scope="row" className="px-2 py-1 text-left font-normal">
                    {e.label} <span className="text-ink/70">({e.unit})</span>
                  </th>
                  <td className="px-2 py-1">{formatNumber(e.estimate, 4)}</td>
                  <td className="px-2 py-1">{e.se === null ? "—" : formatNumber(e.se, 3)}</td>
                </tr>
              ))}
            </tbody>
          </table>
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <FitChart temperatures={result.temperatures} values={result.values} curve={result.curve} residuals={result.residuals} label={appliesTo === "hazard" ? "Hazard" : "Rate"} />
          </Suspense>
          {!readOnly && result.converged && doc.rates.length > 0 && (
            <div className="flex flex-wrap items-end gap-3">
              <div>
                <label htmlFor="climate-fit-target" className="block font-bold">
                  Attach the fitted curve to
                </label>
                <select id="climate-fit-target" value={target} onChange={(e) => setTarget(e.target.value)} className="rounded-md border border-ink/40 bg-white px-3 py-2">
                  {doc.rates.map((r) => (
                    <option key={r.id} value={r.id}>
                      {r.name}
                    </option>
                  ))}
                </select>
              </div>
              <Button variant="secondary" onClick={() => onAttach(target, result.response)}>
                Attach
              </Button>
            </div>
          )}
        </div>
      )}
    </div>
  );
}
