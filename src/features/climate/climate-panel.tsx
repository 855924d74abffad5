/**
 * Climate: thermal responses of the vital rates, λ as a function of
 * temperature with the persistence window, fits to measurements, and
 * projections under a warming trajectory (METHODS.md §3). Every change to a
 * response, the range or the trajectory is an ordinary, undoable edit of the
 * life cycle.
 */
import { useSearchParams } from "react-router";
import { FORM_LABELS } from "../../../shared/climate";
import type { LifeCycle } from "../../../shared/lifecycle";
import type { TemperatureRange, ThermalResponse, WarmingTrajectory } from "../../../shared/lifecycle/thermal";
import { Alert } from "../../components/ui/alert";
import { Section } from "../../components/ui/layout";
import type { EditorPanelProps } from "../../lib/editor-types";
import { formatNumber } from "../../lib/number-format";
import { FitSection } from "./fit-section";
import { LambdaSection } from "./lambda-section";
import { ResponseForm } from "./response-form";
import { TrajectorySection } from "./trajectory-section";
import { CAUTIONS } from "./warming-run";

export interface ClimatePanelProps extends EditorPanelProps {
  lifeCycleId: string;
  /** A warming Run uses the saved life cycle, so it starts only when nothing is pending. */
  saved: boolean;
}

function withThermal(doc: LifeCycle, rateId: string, thermal: ThermalResponse | undefined): LifeCycle {
  return {
    ...doc,
    rates: doc.rates.map((r) => {
      if (r.id !== rateId) return r;
      const { thermal: _old, ...rest } = r;
      return thermal ? { ...rest, thermal } : rest;
    }),
  };
}

export function ClimatePanel({ document: doc, onChange, readOnly, lifeCycleId, saved }: ClimatePanelProps) {
  const [search, setSearch] = useSearchParams();
  const selectedId = search.get("rate") ?? doc.rates.find((r) => r.thermal)?.id ?? doc.rates[0]?.id ?? null;
  const selected = doc.rates.find((r) => r.id === selectedId) ?? null;
  const pick = (id: string) =>
    setSearch(
      (params) => {
        const next = new URLSearchParams(params);
        next.set("rate", id);
        return next;
      },
      { replace: true },
    );

  if (doc.stages.length === 0 || doc.rates.length === 0) {
    return <Alert tone="info">Add stages, arrows and named vital rates first: thermal responses attach to vital rates (Rates tab).</Alert>;
  }

  return (
    <div className="space-y-4">
      <Section
        title="Thermal responses"
        description="Pick a vital rate to give it a response to temperature. °C in this form; the Arrhenius and Schoolfield formulas convert to kelvin inside, as published."
      >
        <div className="grid gap-4 lg:grid-cols-[14rem_1fr]">
          <ul aria-label="Vital rates" className="space-y-1">
            {doc.rates.map((r) => (
              <li key={r.id}>
                <button
                  type="button"
                  onClick={() => pick(r.id)}
                  aria-current={r.id === selected?.id ? "true" : undefined}
                  className={`w-full rounded-md border px-3 py-2 text-left ${r.id === selected?.id ? "border-indigo bg-indigo/10 font-bold" : "border-ink/20 hover:bg-ink/5"}`}
                >
                  <span className="font-mono">{r.name}</span> <span className="text-sm text-ink/75">= {formatNumber(r.value, 4)}</span>
                  <span className="block text-sm text-ink/80">{r.thermal ? `${FORM_LABELS[r.thermal.form]}${r.thermal.appliesTo === "hazard" ? " (hazard)" : ""}` : "no response"}</span>
                </button>
              </li>
            ))}
          </ul>
          {selected && (
            <div>
              <h3 className="mb-2 text-lg font-bold">
                Response of <span className="font-mono">{selected.name}</span>
                {selected.notes && <span className="ml-2 text-sm font-normal text-ink/75">{selected.notes}</span>}
              </h3>
              <ResponseForm
                key={`${selected.id}:${JSON.stringify(selected.thermal ?? null)}`}
                rate={selected}
                readOnly={readOnly}
                onSave={(response) => onChange(withThermal(doc, selected.id, response), `Set the thermal response of ${selected.name}`)}
                onRemove={() => onChange(withThermal(doc, selected.id, undefined), `Remove the thermal response of ${selected.name}`)}
              />
            </div>
          )}
        </div>
      </Section>

      <Section title="λ over temperature" description="λ at 200 temperatures of the range, with the persistence window (λ ≥ 1) shaded; its edges are found by root-finding and hold λ = 1 to within 10⁻⁹.">
        <LambdaSection
          document={doc}
          readOnly={readOnly}
          onRangeChange={(range: TemperatureRange) => onChange({ ...doc, climate: { ...doc.climate, range } }, `Set the temperature range to ${range.min}–${range.max} °C`)}
        />
      </Section>

      <Section title="Fit a response to measurements" description="Nonlinear least squares (Levenberg–Marquardt); standard errors √diag((JᵀJ)⁻¹·RSS/(n−p)) from the Jacobian at the optimum.">
        <FitSection
          document={doc}
          readOnly={readOnly}
          onAttach={(rateId, response) => {
            const rate = doc.rates.find((r) => r.id === rateId);
            onChange(withThermal(doc, rateId, response), `Attach a fitted ${FORM_LABELS[response.form]} response to ${rate?.name ?? "a rate"}`);
            pick(rateId);
          }}
        />
      </Section>

      <Section title="Warming trajectory" description="Project the population through one matrix per year, each at that year's temperature.">
        <TrajectorySection
          document={doc}
          lifeCycleId={lifeCycleId}
          readOnly={readOnly}
          saved={saved}
          onSaveTrajectory={(trajectory: WarmingTrajectory) => onChange({ ...doc, climate: { ...doc.climate, trajectory } }, "Set the warming trajectory")}
        />
      </Section>
      <p className="text-sm text-ink/80">{CAUTIONS}</p>
    </div>
  );
}
