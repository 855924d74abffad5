import { describe, expect, it } from "vitest";
import { RiskSettingsSchema, type RiskSettingsInput } from "../../shared/schemas/risk";
import { defaultValues, fieldOfSettingsPath, fromSettings, toSettings, type FormContext } from "../../src/features/risk/settings-model";
import { fullLifeCycle } from "../factories/full-life-cycle";

const doc = fullLifeCycle();
const context: FormContext = { candidates: ["lc-1"], rateIds: doc.rates.map((r) => r.id) };
const base = () => defaultValues(doc, [0.5, 0.3, 0.2], "lc-1");

/** The settings a Run stored, as the server keeps them (defaults filled in). */
const stored = (extra: Partial<RiskSettingsInput> = {}) =>
  RiskSettingsSchema.parse({
    environment: { kind: "vital-rates", rates: [{ rateId: "vr_sa", distribution: "beta", mean: 0.85, sd: 0.05 }] },
    initial: [50, 30, 20],
    horizon: 50,
    replicates: 1000,
    threshold: { value: 10 },
    seed: 42,
    ...extra,
  });

describe("the Risk form and the settings of an earlier Run", () => {
  it("a new form runs the life cycle as it is: no scenario in the payload", () => {
    expect(base().scenarioId).toBe("");
    expect(toSettings(base(), context)).not.toHaveProperty("scenarioId");
  });

  it("putting a scenario's Run in the form and starting it again keeps the scenario (it used to be dropped)", () => {
    const run = stored({ scenarioId: "sc_fence" });
    const values = fromSettings(run, base(), doc);
    expect(values.scenarioId).toBe("sc_fence");
    const again = RiskSettingsSchema.parse(toSettings(values, context));
    expect(again.scenarioId).toBe("sc_fence");
    // Everything else the Run was made with comes back unchanged too.
    expect(again).toEqual(run);
  });

  it("a Run without a scenario is repeated without one, even over a form that had one chosen", () => {
    const run = stored();
    const values = fromSettings(run, { ...base(), scenarioId: "sc_head" }, doc);
    expect(values.scenarioId).toBe("");
    expect(RiskSettingsSchema.parse(toSettings(values, context))).toEqual(run);
  });

  it("the server's refusal of a scenario lands under the scenario input", () => {
    expect(fieldOfSettingsPath("settings.scenarioId", base(), context)).toBe("scenarioId");
  });
});
