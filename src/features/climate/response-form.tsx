/**
 * The thermal response of one vital rate: form, what it applies to, and its
 * parameters in the units people use (°C, eV), with a live preview of the
 * rate over temperature drawn as the person types. "Save response" writes
 * it into the life cycle (undoable, autosaved); problems are shown next to
 * their field and nothing is saved until they are fixed.
 */
import { lazy, Suspense, useMemo, useState } from "react";
import { defaultResponse, FORM_FORMULAS, FORM_LABELS, RESPONSE_DEFAULTS, responseOptimum, responseValue, THERMAL_PARAMETERS } from "../../../shared/climate";
import { rateScale, type VitalRate } from "../../../shared/lifecycle";
import { checkThermalRules, THERMAL_FORMS, ThermalResponseSchema, type ThermalForm, type ThermalResponse } from "../../../shared/lifecycle/thermal";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { Loading } from "../../components/ui/spinner";
import { formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";

const ResponsePreviewChart = lazy(() => import("./charts").then((m) => ({ default: m.ResponsePreviewChart })));

type Draft = { form: ThermalForm; appliesTo: "rate" | "hazard"; text: Record<string, string> };

const toDraft = (r: ThermalResponse): Draft => ({
  form: r.form,
  appliesTo: r.appliesTo,
  text: Object.fromEntries(THERMAL_PARAMETERS[r.form].map((p) => [p.key, String(Number(((r as unknown as Record<string, number>)[p.key] ?? 0).toPrecision(6)))])),
});

/** The response a draft describes, or the problems by field. */
function readDraft(draft: Draft, rate: VitalRate): { response: ThermalResponse | null; errors: Record<string, string> } {
  const errors: Record<string, string> = {};
  const values: Record<string, number | string> = { form: draft.form, appliesTo: draft.appliesTo };
  for (const p of THERMAL_PARAMETERS[draft.form]) {
    const v = parseNumberInput(draft.text[p.key] ?? "");
    if (v === null) errors[p.key] = "Type a number.";
    else values[p.key] = v;
  }
  if (Object.keys(errors).length) return { response: null, errors };
  const parsed = ThermalResponseSchema.safeParse(values);
  if (!parsed.success) {
    for (const issue of parsed.error.issues) errors[String(issue.path[0] ?? "form")] ??= issue.message;
    return { response: null, errors };
  }
  checkThermalRules({ rates: [{ ...rate, thermal: parsed.data }] }, (path, message) => {
    errors[String(path[path.length - 1])] ??= message;
  });
  return Object.keys(errors).length ? { response: null, errors } : { response: parsed.data, errors };
}

export interface ResponseFormProps {
  rate: VitalRate;
  readOnly: boolean;
  onSave: (response: ThermalResponse) => void;
  onRemove: () => void;
}

export function ResponseForm({ rate, readOnly, onSave, onRemove }: ResponseFormProps) {
  const probability = rateScale(rate) === "probability";
  const initial = rate.thermal ?? defaultResponse("arrhenius", { value: rate.value, probability });
  const [draft, setDraft] = useState<Draft>(() => toDraft(initial));
  const { response, errors } = useMemo(() => readDraft(draft, rate), [draft, rate]);
  const [lastGood, setLastGood] = useState<ThermalResponse>(initial);
  if (response && response !== lastGood && JSON.stringify(response) !== JSON.stringify(lastGood)) setLastGood(response);
  const shown = response ?? lastGood;
  const dirty = !rate.thermal || JSON.stringify(rate.thermal) !== JSON.stringify(response);

  const preview = useMemo(() => {
    const optimum = responseOptimum(shown);
    const lo = shown.form === "briere" ? Math.max(-10, shown.lower - 5) : -5;
    const hi = shown.form === "briere" ? shown.upper + 5 : shown.form === "gaussian-quadratic" ? shown.criticalMaximum + 5 : shown.form === "schoolfield" ? shown.inactivationTemperature + 10 : 40;
    const temperatures = Array.from({ length: 121 }, (_, i) => lo + ((hi - lo) * i) / 120);
    const values = temperatures.map((t) => {
      const v = responseValue(shown, t);
      if (shown.appliesTo === "hazard") return Math.exp(-v);
      return probability ? Math.min(1, v) : v;
    });
    const clamped = shown.appliesTo === "rate" && probability && temperatures.some((t) => responseValue(shown, t) > 1);
    return { temperatures, values, optimum, clamped };
  }, [shown, probability]);

  const changeForm = (form: ThermalForm) => setDraft({ ...toDraft(defaultResponse(form, { value: rate.value, probability })) });
  const set = (key: string, text: string) => setDraft((d) => ({ ...d, text: { ...d.text, [key]: text } }));
  const id = (key: string) => `thermal-${rate.id}-${key}`;
  const atReference = responseValue(shown, 20);

  return (
    <div className="space-y-4">
      <div className="grid gap-4 lg:grid-cols-2">
        <fieldset className="space-y-3" disabled={readOnly}>
          <legend className="sr-only">Thermal response of {rate.name}</legend>
          <div className="space-y-1">
            <label htmlFor={id("form")} className="block font-bold">
              Response form
            </label>
            <select id={id("form")} value={draft.form} onChange={(e) => changeForm(e.target.value as ThermalForm)} className="block w-full rounded-md border border-ink/40 bg-white px-3 py-2">
              {THERMAL_FORMS.map((f) => (
                <option key={f} value={f}>
                  {FORM_LABELS[f]}
                </option>
              ))}
            </select>
            <p className="text-sm text-ink/75">{FORM_FORMULAS[draft.form]}</p>
          </div>
          <div className="space-y-1">
            <span className="block font-bold">Applies to</span>
            <label className="mr-4 inline-flex items-center gap-2">
              <input type="radio" name={id("applies")} checked={draft.appliesTo === "rate"} onChange={() => setDraft((d) => ({ ...d, appliesTo: "rate" }))} />
              the rate itself
            </label>
            <label className="inline-flex items-center gap-2">
              <input type="radio" name={id("applies")} checked={draft.appliesTo === "hazard"} onChange={() => setDraft((d) => ({ ...d, appliesTo: "hazard" }))} />
              a hazard h(T): survival = exp(−h · 1 {`time step`})
            </label>
            {errors.appliesTo && <p className="text-sm font-bold text-brick">✕ {errors.appliesTo}</p>}
          </div>
          {THERMAL_PARAMETERS[draft.form].map((p) => {
            const source = (RESPONSE_DEFAULTS as Record<string, { source: string } | undefined>)[p.key]?.source;
            const unit = p.unit || (draft.appliesTo === "hazard" ? "per time step (hazard)" : rate.unit ?? "rate units");
            return (
              <div key={p.key} className="space-y-1">
                <label htmlFor={id(p.key)} className="block font-bold">
                  {p.label} <span className="font-normal text-ink/75">({unit})</span>
                </label>
                <input
                  id={id(p.key)}
                  inputMode="decimal"
                  value={draft.text[p.key] ?? ""}
                  onChange={(e) => set(p.key, e.target.value)}
                  aria-invalid={errors[p.key] ? true : undefined}
                  aria-describedby={errors[p.key] ? `${id(p.key)}-error` : source ? `${id(p.key)}-source` : undefined}
                  className={`block w-full rounded-md border bg-white px-3 py-2 ${errors[p.key] ? "border-2 border-brick" : "border-ink/40"}`}
                />
                {errors[p.key] ? (
                  <p id={`${id(p.key)}-error`} className="text-sm font-bold text-brick">
                    ✕ {errors[p.key]}
                  </p>
                ) : (
                  source && (
                    <p id={`${id(p.key)}-source`} className="text-sm text-ink/70">
                      Default {source}
                    </p>
                  )
                )}
              </div>
            );
          })}
        </fieldset>
        <div className="space-y-2">
          <h4 className="font-bold">
            Preview: {rate.name} over temperature{draft.appliesTo === "hazard" ? " (as survival exp(−h))" : ""}
          </h4>
          <Suspense fallback={<Loading label="Loading the chart…" />}>
            <ResponsePreviewChart
              temperatures={preview.temperatures}
              values={preview.values}
              label={draft.appliesTo === "hazard" ? `${rate.name} (survival)` : rate.name}
              optimum={draft.appliesTo === "hazard" ? null : preview.optimum}
              ariaLabel={`Preview of ${rate.name} from ${formatNumber(preview.temperatures[0], 3)} to ${formatNumber(preview.temperatures[120], 3)} °C`}
            />
          </Suspense>
          <p className="text-sm">
            At 20 °C the response gives {formatNumber(shown.appliesTo === "hazard" ? Math.exp(-atReference) : atReference, 4)}
            {shown.appliesTo === "hazard" ? " (survival)" : ""}; the rate's value in the life cycle is {formatNumber(rate.value, 4)}.
            {preview.optimum !== null && shown.appliesTo === "rate" && <> Peak at {formatNumber(preview.optimum, 4)} °C by the form's optimum formula.</>}
          </p>
          {preview.clamped && (
            <Alert tone="warning" title="Clamped to 1">
              {rate.name} is a probability, but this response rises above 1 at some temperatures; there it is held at 1. Apply the response to a hazard instead to keep
              survival below 1 without clamping.
            </Alert>
          )}
          {!response && <p className="text-sm text-ink/80">The preview shows the last valid parameters until the problems on the left are fixed.</p>}
        </div>
      </div>
      {!readOnly && (
        <div className="flex flex-wrap gap-2">
          <Button onClick={() => response && onSave(response)} disabled={!response || !dirty}>
            {rate.thermal ? "Save response" : `Attach response to ${rate.name}`}
          </Button>
          {rate.thermal && (
            <Button variant="secondary" onClick={onRemove}>
              Remove response
            </Button>
          )}
        </div>
      )}
    </div>
  );
}
