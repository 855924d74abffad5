/**
 * Settings of a new Risk run, for editors: how the environment varies from
 * year to year, chance among individuals, the starting population, the
 * quasi-extinction threshold, and the length and size of the Run. Checked
 * as the person types with the same schema the server uses; the server's
 * own refusals land under the same inputs.
 */
import { Fragment, useEffect, useId, useMemo, useRef, useState, type ReactNode } from "react";
import { get, useFieldArray, useForm, useWatch, type FieldErrors, type UseFormRegisterReturn } from "react-hook-form";
import type { LifeCycle } from "../../../shared/lifecycle";
import { MAX_HORIZON, MAX_REPLICATES, RATE_DISTRIBUTIONS, type RiskSettings } from "../../../shared/schemas/risk";
import { isApiError } from "../../api/client";
import { useLifeCycles, type LifeCycleSummary } from "../../api/life-cycles";
import { type RiskRun, useStartRiskRun } from "../../api/runs";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";
import { pluralOf } from "./risk-format";
import { GENERAL_ERROR, riskResolver } from "./settings-resolver";
import { defaultValues, fieldOfSettingsPath, key, spreadTotal, type FormContext, type RiskFormValues } from "./settings-model";

export interface RiskSettingsFormProps {
  lifeCycleId: string;
  studyId: string;
  document: LifeCycle;
  stableStage: readonly number[] | null;
  /** Why a Run cannot start now (changes not yet saved, say), or null. */
  blocked: string | null;
  /** Values to load (an earlier Run's settings); `serial` changes with each request. */
  preset: { values: RiskFormValues; serial: number } | null;
  onStarted: (run: RiskRun) => void;
}

/** What was typed, per life cycle and stage set, kept while the person visits other tabs. */
const drafts = new Map<string, RiskFormValues>();

const DISTRIBUTION_WORDS: Record<(typeof RATE_DISTRIBUTIONS)[number], string> = {
  beta: "beta (0–1)",
  lognormal: "lognormal",
  gamma: "gamma",
};

const errorOf = (errors: FieldErrors<RiskFormValues>, name: string): string | undefined => (get(errors, name) as { message?: string } | undefined)?.message;

/** A compact labelled input with its error under it (tied by aria-describedby). */
function Input({
  label,
  hideLabel = false,
  error,
  hint,
  registration,
  className = "w-28",
  inputMode = "decimal",
  placeholder,
  errorElsewhere,
}: {
  label: string;
  hideLabel?: boolean;
  error?: string | undefined;
  /** Id of the element that shows `error` (a row under a table row, say) instead of the input's own line. */
  errorElsewhere?: string;
  hint?: ReactNode;
  registration: UseFormRegisterReturn;
  className?: string;
  inputMode?: "decimal" | "numeric" | "text";
  placeholder?: string;
}) {
  const id = useId();
  const errorId = errorElsewhere ?? `${id}-error`;
  const described = [hint ? `${id}-hint` : null, error ? errorId : null].filter(Boolean).join(" ") || undefined;
  return (
    <div className={`space-y-1 ${className}`}>
      <label htmlFor={id} className={hideLabel ? "sr-only" : "block text-sm font-bold"}>
        {label}
      </label>
      <input
        id={id}
        type="text"
        inputMode={inputMode}
        autoComplete="off"
        placeholder={placeholder}
        aria-invalid={error ? true : undefined}
        aria-describedby={described}
        className={`block w-full rounded border bg-white px-2 py-1 text-ink tabular-nums placeholder:text-ink/60 ${error ? "border-2 border-brick" : "border-ink/40"}`}
        {...registration}
      />
      {hint && (
        <p id={`${id}-hint`} className="text-xs text-ink/75">
          {hint}
        </p>
      )}
      {error && !errorElsewhere && <FieldMessage id={errorId} message={error} />}
    </div>
  );
}

function FieldMessage({ id, message }: { id?: string; message: string }) {
  return (
    <p id={id} className="text-sm font-bold text-brick">
      <span aria-hidden="true">✕ </span>
      {message}
    </p>
  );
}

function Group({ legend, help, children }: { legend: string; help?: ReactNode; children: ReactNode }) {
  return (
    // min-w-0: a fieldset is as wide as its widest content by default, and the rate table must scroll inside it instead.
    <fieldset className="min-w-0 space-y-3 rounded-md border border-ink/15 p-4">
      <legend className="px-1 text-base font-bold">{legend}</legend>
      {help && <div className="-mt-1 max-w-3xl text-sm text-ink/80">{help}</div>}
      {children}
    </fieldset>
  );
}

export function RiskSettingsForm({ lifeCycleId, studyId, document: doc, stableStage, blocked, preset, onStarted }: RiskSettingsFormProps) {
  const lifeCycles = useLifeCycles(studyId);
  const stageCount = doc.stages.length;
  const studyLifeCycles = useMemo(() => lifeCycles.data ?? [], [lifeCycles.data]);
  const context: FormContext = useMemo(() => {
    const same = studyLifeCycles.filter((lc) => lc.stageCount === stageCount).map((lc) => lc.id);
    // This life cycle first, then the others in the Study's order.
    return { candidates: [lifeCycleId, ...same.filter((id) => id !== lifeCycleId)], rateIds: doc.rates.map((r) => r.id) };
  }, [studyLifeCycles, stageCount, lifeCycleId, doc.rates]);

  const draftKey = `${lifeCycleId}|${doc.stages.map((s) => s.id).join(",")}`;
  const form = useForm<RiskFormValues, FormContext, RiskSettings>({
    defaultValues: drafts.get(draftKey) ?? defaultValues(doc, stableStage, lifeCycleId),
    resolver: riskResolver,
    context,
  });
  const { register, control, handleSubmit, setValue, getValues, setError, reset, watch, trigger, formState } = form;
  const errors = formState.errors;
  const values = useWatch({ control }) as RiskFormValues;
  const correlations = useFieldArray({ control, name: "correlations" });
  const start = useStartRiskRun(lifeCycleId);
  const [generalError, setGeneralError] = useState<string | null>(null);
  // "More options" opens by itself when one of its inputs has a problem.
  const [moreOpen, setMoreOpen] = useState(false);
  const moreHasErrors = Boolean(errors.reportYears || errors.seed || errors.burnIn);
  useEffect(() => {
    if (moreHasErrors) setMoreOpen(true);
  }, [moreHasErrors]);

  // After a first try, every change checks the whole form again: many problems concern several inputs at once
  // (weights that must sum to 1, a threshold against the starting numbers) and sit beside a group, not one input.
  const submitted = formState.isSubmitted;
  useEffect(() => {
    if (!submitted) return;
    const subscription = watch(() => void trigger());
    return () => subscription.unsubscribe();
  }, [submitted, watch, trigger]);

  // Keep the draft across tab switches.
  const latest = useRef(getValues);
  latest.current = getValues;
  useEffect(() => () => void drafts.set(draftKey, latest.current()), [draftKey]);

  // Load an earlier Run's settings when asked.
  const lastPreset = useRef<number | null>(null);
  useEffect(() => {
    if (!preset || lastPreset.current === preset.serial) return;
    lastPreset.current = preset.serial;
    reset(preset.values);
    setGeneralError(null);
    if (preset.values.reportYears || preset.values.seed || preset.values.burnIn) setMoreOpen(true);
  }, [preset, reset]);

  // The stable stage distribution can arrive after the form: fill the stages if nobody has yet.
  useEffect(() => {
    if (!stableStage || stableStage.length !== stageCount) return;
    const initial = getValues("initial");
    if (initial.every((v) => v.trim() === "")) spread(getValues("total"));
  }, [stableStage, stageCount]); // only when the distribution arrives

  function spread(totalText: string) {
    const total = parseNumberInput(totalText);
    if (!stableStage || stableStage.length !== stageCount || total === null || total < 0) return;
    spreadTotal(total, stableStage).forEach((v, i) => setValue(`initial.${i}`, String(v), { shouldValidate: formState.isSubmitted }));
  }

  const submit = handleSubmit((settings) => {
    setGeneralError(null);
    start.mutate(settings, {
      onSuccess: (run) => onStarted(run),
      onError: (error) => {
        if (!isApiError(error) || error.fields.length === 0) {
          setGeneralError(error.message);
          return;
        }
        const leftover: string[] = [];
        let focused = false;
        for (const f of error.fields) {
          const field = fieldOfSettingsPath(f.path, getValues(), context);
          if (field === null) leftover.push(f.message);
          else {
            setError(field as "root.settings", { type: "server", message: f.message }, { shouldFocus: !focused });
            focused = true;
          }
        }
        setGeneralError(leftover.length > 0 ? leftover.join(" ") : "The server refused these settings: see the messages beside the inputs.");
      },
    });
  });

  const unit = doc.timeStepUnit;
  const units = pluralOf(unit);
  const rootError = errorOf(errors, GENERAL_ERROR);
  const initialSum = (values.initial ?? []).reduce((s, t) => s + (parseNumberInput(t ?? "") ?? 0), 0);

  return (
    <form onSubmit={submit} noValidate className="space-y-4" aria-labelledby="risk-new-run-heading">
      <h3 id="risk-new-run-heading" className="text-lg font-bold">
        Settings for a new Run
      </h3>

      <Group
        legend="Year-to-year variation (environmental stochasticity)"
        help="Good and bad years change the rates. Choose how: draw chosen vital rates afresh each year, or pick one of several life cycles of this Study each year (e.g. one per site or year type)."
      >
        <div className="flex flex-col gap-2" role="radiogroup" aria-label="How the environment varies">
          {(
            [
              ["vital-rates", "Vital rates vary", "Each year the chosen rates are drawn from a distribution around their mean; the other rates keep their values."],
              ["matrices", "One of several life cycles at random", "Each year one life cycle is drawn, independently of last year, with the weights you give."],
              ["markov", "Life cycles follow a Markov chain", "This year’s life cycle depends on last year’s (runs of good or bad years)."],
            ] as const
          ).map(([value, title, help]) => (
            <label key={value} className="flex items-start gap-2">
              <input type="radio" value={value} className="mt-1" {...register("kind")} />
              <span>
                <span className="font-bold">{title}</span>
                <span className="block text-sm text-ink/80">{help}</span>
              </span>
            </label>
          ))}
        </div>

        {values.kind === "vital-rates" && <VitalRateFields form={form} doc={doc} values={values} correlations={correlations} />}
        {values.kind !== "vital-rates" &&
          (lifeCycles.isPending ? (
            <Loading label="Loading the Study’s life cycles…" />
          ) : lifeCycles.isError ? (
            <QueryError error={lifeCycles.error} what="the Study’s life cycles" onRetry={() => void lifeCycles.refetch()} />
          ) : values.kind === "matrices" ? (
            <MatrixSetFields form={form} lifeCycles={studyLifeCycles} context={context} lifeCycleId={lifeCycleId} stageCount={stageCount} values={values} />
          ) : (
            <MarkovFields form={form} lifeCycles={studyLifeCycles} context={context} lifeCycleId={lifeCycleId} stageCount={stageCount} values={values} />
          ))}
      </Group>

      {((doc.scenarios ?? []).length > 0 || values.scenarioId) && (
        <Group
          legend="Management scenario"
          help="Run the life cycle as changed by one of its Levers scenarios (the drawn rates’ means move with the scenario’s changes), or as it is."
        >
          <div className="space-y-1">
            <label htmlFor="risk-scenario" className="block font-bold">
              Scenario
            </label>
            <select
              id="risk-scenario"
              className="rounded border border-ink/40 bg-white px-2 py-1"
              aria-invalid={errorOf(errors, "scenarioId") ? true : undefined}
              aria-describedby={errorOf(errors, "scenarioId") ? "risk-scenario-error" : undefined}
              {...register("scenarioId")}
            >
              <option value="">None: the life cycle as it is</option>
              {(doc.scenarios ?? []).map((s) => (
                <option key={s.id} value={s.id}>
                  {s.name}
                </option>
              ))}
              {values.scenarioId && !(doc.scenarios ?? []).some((s) => s.id === values.scenarioId) && (
                <option value={values.scenarioId}>A scenario no longer in this life cycle ({values.scenarioId})</option>
              )}
            </select>
            {errorOf(errors, "scenarioId") && <FieldMessage id="risk-scenario-error" message={errorOf(errors, "scenarioId")!} />}
          </div>
        </Group>
      )}

      <Group
        legend="Population at the start"
        help="Type the total: it is spread over the stages by the stable stage distribution and rounded to whole individuals. Change any stage by hand if you know better."
      >
        <div className="flex flex-wrap items-end gap-3">
          <Input label="Total individuals" registration={register("total", { onChange: (e: { target: { value: string } }) => spread(e.target.value) })} className="w-40" />
          <Button variant="secondary" size="sm" onClick={() => spread(getValues("total"))} disabled={!stableStage}>
            Spread the total again
          </Button>
        </div>
        {!stableStage && <p className="text-sm text-ink/85">The stable stage distribution is not available for the life cycle as it is: type the numbers per stage.</p>}
        <div className="flex flex-wrap gap-3">
          {doc.stages.map((s, i) => (
            <Input key={s.id} label={`Individuals in ${s.name}`} registration={register(`initial.${i}`)} error={errorOf(errors, `initial.${i}`)} className="w-40" placeholder="0" />
          ))}
        </div>
        <p className="text-sm tabular-nums">Sum of the stages: {formatNumber(initialSum, 6)}</p>
        {errorOf(errors, "initialList") && <FieldMessage message={errorOf(errors, "initialList")!} />}
      </Group>

      <Group legend="Chance and crowding">
        <label className="flex items-start gap-2">
          <input type="checkbox" className="mt-1" {...register("demographic")} />
          <span>
            <span className="font-bold">Demographic stochasticity</span>
            <span className="block text-sm text-ink/80">
              Count whole individuals, each surviving, growing and breeding by chance. It matters for small populations (tens of individuals) and slows a Run down.
            </span>
          </span>
        </label>
        {errorOf(errors, "demographic") && <FieldMessage message={errorOf(errors, "demographic")!} />}
        <label className="flex items-start gap-2">
          <input type="checkbox" className="mt-1" {...register("ceilingOn")} />
          <span>
            <span className="font-bold">Cap the total at a ceiling</span>
            <span className="block text-sm text-ink/80">Above the ceiling every stage is scaled down, a simple stand-in for limited habitat.</span>
          </span>
        </label>
        {values.ceilingOn && <Input label="Ceiling (individuals)" registration={register("ceiling")} error={errorOf(errors, "ceiling")} className="w-40" />}
      </Group>

      <Group
        legend="Quasi-extinction"
        help="A future counts as quasi-extinct the first time the population falls to the threshold or below, even if it climbs back later. Set it above zero: below some level a population is doomed or no longer viable."
      >
        <Input label="Quasi-extinction threshold (individuals)" registration={register("thresholdValue")} error={errorOf(errors, "thresholdValue")} className="w-80" />
        <div role="radiogroup" aria-label="What the threshold counts" className="flex flex-col gap-1">
          <label className="flex items-center gap-2">
            <input type="radio" value="total" {...register("thresholdOn")} />
            All stages together
          </label>
          <label className="flex items-center gap-2">
            <input type="radio" value="stages" {...register("thresholdOn")} />
            Only the stages I choose (e.g. breeding adults)
          </label>
        </div>
        {values.thresholdOn === "stages" && (
          <div className="flex flex-wrap gap-x-4 gap-y-1 pl-6">
            {doc.stages.map((s) => (
              <label key={s.id} className="flex items-center gap-2">
                <input type="checkbox" value={s.id} {...register("thresholdStages")} />
                {s.name}
              </label>
            ))}
          </div>
        )}
        {errorOf(errors, "thresholdStagesList") && <FieldMessage message={errorOf(errors, "thresholdStagesList")!} />}
      </Group>

      <Group legend="Length and size of the Run">
        <div className="flex flex-wrap gap-4">
          <Input
            label={`Horizon (${units})`}
            registration={register("horizon")}
            error={errorOf(errors, "horizon")}
            hint={`How far ahead to simulate, up to ${MAX_HORIZON.toLocaleString("en")}. Criterion E needs up to 100 years.`}
            className="w-56"
            inputMode="numeric"
          />
          <Input
            label="Replicates (simulated futures)"
            registration={register("replicates")}
            error={errorOf(errors, "replicates")}
            hint={`Up to ${MAX_REPLICATES.toLocaleString("en")}. More replicates narrow the intervals: about ± 3 percentage points at 1,000, ± 1 at 10,000.`}
            className="w-72"
            inputMode="numeric"
          />
        </div>
        <details className="space-y-3" open={moreOpen} onToggle={(e) => setMoreOpen(e.currentTarget.open)}>
          <summary className="cursor-pointer font-bold text-indigo">More options</summary>
          <div className="mt-3 flex flex-wrap gap-4">
            <Input
              label={`${units.charAt(0).toUpperCase() + units.slice(1)} for the table`}
              registration={register("reportYears")}
              error={errorOf(errors, "reportYears")}
              hint="Separated by commas, e.g. 10, 20, 50. Blank: 10, 20, 50, 100… and the horizon."
              className="w-72"
              inputMode="text"
            />
            <Input label="Seed" registration={register("seed")} error={errorOf(errors, "seed")} hint="The same seed and settings give the same result. Blank: a new one." className="w-56" inputMode="numeric" />
            <Input
              label={`Burn-in (${units})`}
              registration={register("burnIn")}
              error={errorOf(errors, "burnIn")}
              hint="Left out of λs while the stage mix settles. Blank: chosen from the damping ratio."
              className="w-56"
              inputMode="numeric"
            />
          </div>
        </details>
      </Group>

      {(rootError || generalError) && (
        <Alert tone="error" title="The Run cannot start with these settings.">
          <p>{generalError ?? rootError}</p>
        </Alert>
      )}
      <div className="flex flex-wrap items-center gap-3">
        <Button type="submit" pending={start.isPending} disabled={blocked !== null}>
          Start run
        </Button>
        {blocked && <p className="text-sm">{blocked}</p>}
      </div>
    </form>
  );
}

type Form = ReturnType<typeof useForm<RiskFormValues, FormContext, RiskSettings>>;

function VitalRateFields({ form, doc, values, correlations }: { form: Form; doc: LifeCycle; values: RiskFormValues; correlations: ReturnType<typeof useFieldArray<RiskFormValues, "correlations">> }) {
  const { register, formState } = form;
  const errors = formState.errors;
  const chosen = doc.rates.filter((r) => values.rates?.[key(r.id)]?.use);
  if (doc.rates.length === 0) return <p className="text-sm">This life cycle has no named vital rates. Add them on the Rates tab and use them in the arrows’ formulas, or let life cycles vary instead.</p>;
  return (
    <div className="space-y-3">
      <div className="overflow-x-auto">
        <table className="w-full border-collapse text-left text-sm">
          <caption className="sr-only">Vital rates of this life cycle and how each varies between years</caption>
          <thead>
            <tr className="border-b-2 border-ink/20">
              <th scope="col" className="px-2 py-2">
                Vital rate
              </th>
              <th scope="col" className="px-2 py-2">
                Distribution
              </th>
              <th scope="col" className="px-2 py-2">
                Mean
              </th>
              <th scope="col" className="px-2 py-2">
                SD between years
              </th>
            </tr>
          </thead>
          <tbody>
            {doc.rates.map((r) => {
              const k = key(r.id);
              const row = values.rates?.[k];
              const use = row?.use ?? false;
              const mean = parseNumberInput(row?.mean ?? "");
              const betaLimit = row?.distribution === "beta" && mean !== null && mean > 0 && mean < 1 ? Math.sqrt(mean * (1 - mean)) : null;
              // Messages are long and the columns narrow: they go in a row of their own under the rate, tied to their inputs.
              const problems = (["use", "mean", "sd"] as const)
                .map((f) => ({ f, id: `risk-rate-${r.id}-${f}-error`, message: errorOf(errors, `rates.${k}.${f}`) }))
                .filter((p): p is { f: "use" | "mean" | "sd"; id: string; message: string } => p.message !== undefined);
              const problemId = (f: "use" | "mean" | "sd") => problems.find((p) => p.f === f)?.id;
              return (
                <Fragment key={r.id}>
                  <tr className={`align-top ${problems.length > 0 ? "" : "border-b border-ink/10"}`}>
                    <td className="px-2 py-2">
                      <label className="flex items-center gap-2 font-bold whitespace-nowrap">
                        <input type="checkbox" aria-describedby={problemId("use")} aria-invalid={problemId("use") ? true : undefined} {...register(`rates.${k}.use`)} />
                        <span>
                          Vary {r.name}
                          <span className="block text-xs font-normal text-ink/75">value {formatNumber(r.value, 4)}</span>
                        </span>
                      </label>
                    </td>
                    {use ? (
                      <>
                        <td className="px-2 py-2">
                          <label className="sr-only" htmlFor={`risk-dist-${r.id}`}>
                            Distribution of {r.name}
                          </label>
                          <select id={`risk-dist-${r.id}`} className="rounded border border-ink/40 bg-white px-2 py-1" {...register(`rates.${k}.distribution`)}>
                            {RATE_DISTRIBUTIONS.map((d) => (
                              <option key={d} value={d}>
                                {DISTRIBUTION_WORDS[d]}
                              </option>
                            ))}
                          </select>
                        </td>
                        <td className="px-2 py-2">
                          <Input
                            label={`Mean of ${r.name}`}
                            hideLabel
                            registration={register(`rates.${k}.mean`)}
                            error={errorOf(errors, `rates.${k}.mean`)}
                            errorElsewhere={problemId("mean")}
                            className="w-24"
                          />
                        </td>
                        <td className="px-2 py-2">
                          <Input
                            label={`SD of ${r.name} between years`}
                            hideLabel
                            registration={register(`rates.${k}.sd`)}
                            error={errorOf(errors, `rates.${k}.sd`)}
                            errorElsewhere={problemId("sd")}
                            hint={betaLimit !== null ? `below ${formatNumber(betaLimit, 3)} for this mean` : undefined}
                            className="w-32"
                          />
                        </td>
                      </>
                    ) : (
                      <td colSpan={3} className="px-2 py-2 text-ink/70">
                        kept at {formatNumber(r.value, 4)} every year
                      </td>
                    )}
                  </tr>
                  {problems.length > 0 && (
                    <tr className="border-b border-ink/10">
                      <td colSpan={4} className="px-2 pb-2">
                        {problems.map((p) => (
                          <FieldMessage key={p.f} id={p.id} message={p.message} />
                        ))}
                      </td>
                    </tr>
                  )}
                </Fragment>
              );
            })}
          </tbody>
        </table>
      </div>
      {errorOf(errors, "ratesList") && <FieldMessage message={errorOf(errors, "ratesList")!} />}
      <p className="max-w-3xl text-sm text-ink/80">
        The SD between years is how much the rate itself changes from year to year (environmental variation), not the standard error of its estimate, which also contains sampling
        error. Beta suits probabilities such as survival; lognormal or gamma suit positive rates such as fecundity.
      </p>

      <div className="space-y-2">
        <h4 className="font-bold">Correlations between rates (optional)</h4>
        <p className="max-w-3xl text-sm text-ink/80">Rates that rise and fall together in the same years (r near 1), or trade off (r below 0). Leave empty for independent rates.</p>
        {correlations.fields.map((field, i) => (
          <div key={field.id} className="flex flex-wrap items-start gap-3">
            {(["a", "b"] as const).map((side) => (
              <div key={side} className="space-y-1">
                <label className="block text-sm font-bold" htmlFor={`risk-corr-${field.id}-${side}`}>
                  {side === "a" ? `Correlation ${i + 1}: first rate` : "second rate"}
                </label>
                <select id={`risk-corr-${field.id}-${side}`} className="rounded border border-ink/40 bg-white px-2 py-1" {...register(`correlations.${i}.${side}`)}>
                  {chosen.map((r) => (
                    <option key={r.id} value={r.id}>
                      {r.name}
                    </option>
                  ))}
                </select>
                {errorOf(errors, `correlations.${i}.${side}`) && <FieldMessage message={errorOf(errors, `correlations.${i}.${side}`)!} />}
              </div>
            ))}
            <Input label="r (−1 to 1)" registration={register(`correlations.${i}.r`)} error={errorOf(errors, `correlations.${i}.r`)} />
            <Button variant="quiet" size="sm" className="mt-6" onClick={() => correlations.remove(i)}>
              Remove<span className="sr-only"> correlation {i + 1}</span>
            </Button>
          </div>
        ))}
        {errorOf(errors, "correlationsList") && <FieldMessage message={errorOf(errors, "correlationsList")!} />}
        <Button
          variant="secondary"
          size="sm"
          disabled={chosen.length < 2}
          onClick={() => correlations.append({ a: chosen[0]?.id ?? "", b: chosen[1]?.id ?? "", r: "0.5" })}
        >
          Add a correlation
        </Button>
        {chosen.length < 2 && <p className="text-xs text-ink/75">Vary at least two rates to correlate them.</p>}
      </div>
    </div>
  );
}

interface EnvironmentFieldsProps {
  form: Form;
  lifeCycles: LifeCycleSummary[];
  context: FormContext;
  lifeCycleId: string;
  stageCount: number;
  values: RiskFormValues;
}

/** Life cycles of the Study with a different number of stages cannot be environments: shown, greyed, with the reason. */
function Unusable({ lc, stageCount }: { lc: LifeCycleSummary; stageCount: number }) {
  return (
    <span className="text-ink/60">
      {lc.name} — has {lc.stageCount} stage{lc.stageCount === 1 ? "" : "s"}; this one has {stageCount}
    </span>
  );
}

const lcName = (lifeCycles: LifeCycleSummary[], id: string, lifeCycleId: string) => {
  const name = lifeCycles.find((l) => l.id === id)?.name ?? "This life cycle";
  return id === lifeCycleId ? `${name} (this life cycle)` : name;
};

function MatrixSetFields({ form, lifeCycles, context, lifeCycleId, stageCount, values }: EnvironmentFieldsProps) {
  const { register, setValue, formState } = form;
  const errors = formState.errors;
  const used = context.candidates.filter((id) => values.matrices?.[key(id)]?.use);
  const sum = used.reduce((s, id) => s + (parseNumberInput(values.matrices?.[key(id)]?.weight ?? "") ?? 0), 0);
  const ordered = [...context.candidates.map((id) => ({ id, ok: true })), ...lifeCycles.filter((lc) => !context.candidates.includes(lc.id)).map((lc) => ({ id: lc.id, ok: false }))];
  return (
    <div className="space-y-2">
      <p className="text-sm text-ink/80">Tick the life cycles to draw from and give each a weight: the share of years like it. The weights sum to 1. Life cycles need the same stages, in the same order.</p>
      <ul className="space-y-2">
        {ordered.map(({ id, ok }) => {
          const lc = lifeCycles.find((l) => l.id === id);
          if (!ok) return <li key={id}>{lc && <Unusable lc={lc} stageCount={stageCount} />}</li>;
          const k = key(id);
          const name = lcName(lifeCycles, id, lifeCycleId);
          const use = values.matrices?.[k]?.use ?? false;
          return (
            <li key={id} className="flex flex-wrap items-start gap-3">
              <label className="flex min-w-64 items-center gap-2 pt-1">
                <input type="checkbox" {...register(`matrices.${k}.use`)} />
                {name}
              </label>
              {use && <Input label={`Weight of ${name}`} hideLabel registration={register(`matrices.${k}.weight`)} error={errorOf(errors, `matrices.${k}.weight`)} placeholder="weight" />}
              {errorOf(errors, `matrices.${k}.use`) && <FieldMessage message={errorOf(errors, `matrices.${k}.use`)!} />}
            </li>
          );
        })}
      </ul>
      <div className="flex flex-wrap items-center gap-3">
        <p className="text-sm tabular-nums">Weights sum to {formatNumber(sum, 6)}</p>
        <Button
          variant="secondary"
          size="sm"
          disabled={used.length === 0}
          onClick={() => used.forEach((id) => setValue(`matrices.${key(id)}.weight`, String(1 / used.length), { shouldValidate: formState.isSubmitted }))}
        >
          Equal weights
        </Button>
      </div>
      {errorOf(errors, "matricesList") && <FieldMessage message={errorOf(errors, "matricesList")!} />}
    </div>
  );
}

function MarkovFields({ form, lifeCycles, context, lifeCycleId, stageCount, values }: EnvironmentFieldsProps) {
  const { register, setValue, formState } = form;
  const errors = formState.errors;
  const used = context.candidates.filter((id) => values.markov?.[key(id)]?.use);
  const name = (id: string) => lcName(lifeCycles, id, lifeCycleId);
  const unusable = lifeCycles.filter((lc) => !context.candidates.includes(lc.id));
  // The first year's state is always one of the chosen states.
  const initial = values.markovInitial;
  useEffect(() => {
    if (used.length > 0 && !used.includes(initial)) setValue("markovInitial", used[0]!);
  }, [used, initial, setValue]);
  const rowSum = (from: string) => used.reduce((s, to) => s + (parseNumberInput(values.markov?.[key(from)]?.row?.[key(to)] ?? "") ?? 0), 0);
  return (
    <div className="space-y-3">
      <p className="text-sm text-ink/80">Each ticked life cycle is a state of the environment. Row by row, give the probability of next year’s state given this year’s; each row sums to 1.</p>
      <ul className="space-y-1">
        {context.candidates.map((id) => (
          <li key={id}>
            <label className="flex items-center gap-2">
              <input type="checkbox" {...register(`markov.${key(id)}.use`)} />
              {name(id)}
            </label>
            {errorOf(errors, `markov.${key(id)}.use`) && <FieldMessage message={errorOf(errors, `markov.${key(id)}.use`)!} />}
          </li>
        ))}
        {unusable.map((lc) => (
          <li key={lc.id}>
            <Unusable lc={lc} stageCount={stageCount} />
          </li>
        ))}
      </ul>
      {used.length > 0 && (
        <>
          <div className="overflow-x-auto">
            <table className="border-collapse text-left text-sm">
              <caption className="pb-1 text-left font-bold">Probability of next year’s state (columns) given this year’s (rows)</caption>
              <thead>
                <tr>
                  <th scope="col" className="px-2 py-1">
                    This year
                  </th>
                  {used.map((to) => (
                    <th key={to} scope="col" className="px-2 py-1">
                      to {name(to)}
                    </th>
                  ))}
                  <th scope="col" className="px-2 py-1">
                    Row sum
                  </th>
                </tr>
              </thead>
              <tbody>
                {used.map((from) => (
                  <tr key={from} className="align-top">
                    <th scope="row" className="px-2 py-1">
                      {name(from)}
                    </th>
                    {used.map((to) => (
                      <td key={to} className="px-2 py-1">
                        <Input
                          label={`Probability from ${name(from)} to ${name(to)}`}
                          hideLabel
                          registration={register(`markov.${key(from)}.row.${key(to)}`)}
                          error={errorOf(errors, `markov.${key(from)}.row.${key(to)}`)}
                          placeholder="0"
                        />
                      </td>
                    ))}
                    <td className="px-2 py-1 tabular-nums">
                      {formatNumber(rowSum(from), 6)}
                      {errorOf(errors, `markovRows.${key(from)}`) && <FieldMessage message={errorOf(errors, `markovRows.${key(from)}`)!} />}
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          <div className="flex flex-wrap items-end gap-3">
            <div className="space-y-1">
              <label htmlFor="risk-markov-initial" className="block text-sm font-bold">
                State of the first year
              </label>
              <select id="risk-markov-initial" className="rounded border border-ink/40 bg-white px-2 py-1" {...register("markovInitial")}>
                {used.map((id) => (
                  <option key={id} value={id}>
                    {name(id)}
                  </option>
                ))}
              </select>
              {errorOf(errors, "markovInitial") && <FieldMessage message={errorOf(errors, "markovInitial")!} />}
            </div>
            <Button
              variant="secondary"
              size="sm"
              onClick={() => used.forEach((from) => used.forEach((to) => setValue(`markov.${key(from)}.row.${key(to)}`, String(1 / used.length), { shouldValidate: formState.isSubmitted })))}
            >
              Equal probabilities
            </Button>
          </div>
        </>
      )}
      {errorOf(errors, "markovList") && <FieldMessage message={errorOf(errors, "markovList")!} />}
    </div>
  );
}
