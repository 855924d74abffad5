// An invented 20-size-class life cycle with uncertain vital rates, shared by
// the uncertainty benchmark and its tests: survival s_k and growth g_k per
// class (probabilities with SEs), fecundity m_k of the older half (lognormal
// from an SE), stasis s_k·(1 − g_k), growth s_k·g_k, reproduction s_0·m_k
// (a pre-breeding census: newborns survive their first year before they are
// counted), and correlations between neighbouring classes' survival.
import { LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, type LifeCycle } from "../shared/lifecycle/index";

export function sizeClassLifeCycle(stages = 20, options: { correlated?: boolean } = {}): LifeCycle {
  const ids = Array.from({ length: stages }, (_, k) => `st_${k}`);
  const rates: LifeCycle["rates"] = [];
  const transitions: LifeCycle["transitions"] = [];
  for (let k = 0; k < stages; k++) {
    const s = 0.8 + (0.12 * k) / stages;
    rates.push({ id: `vr_s${k}`, name: `s${k}`, value: Number(s.toFixed(3)), se: 0.04 });
    if (k < stages - 1) rates.push({ id: `vr_g${k}`, name: `g${k}`, value: 0.5, se: 0.05 });
    if (k >= stages / 2) rates.push({ id: `vr_m${k}`, name: `m${k}`, value: Number((1 + (4 * k) / stages).toFixed(3)), se: 0.3 });
  }
  for (let k = 0; k < stages; k++) {
    const last = k === stages - 1;
    transitions.push({ id: `tr_st${k}`, from: ids[k]!, to: ids[k]!, kind: "stasis", rate: last ? `s${k}` : `s${k} * (1 - g${k})` });
    if (!last) transitions.push({ id: `tr_gr${k}`, from: ids[k]!, to: ids[k + 1]!, kind: "growth", rate: `s${k} * g${k}` });
    if (k >= stages / 2) transitions.push({ id: `tr_re${k}`, from: ids[k]!, to: ids[0]!, kind: "reproduction", rate: `s0 * m${k}` });
  }
  const correlations = options.correlated ? Array.from({ length: stages - 1 }, (_, k) => ({ a: `vr_s${k}`, b: `vr_s${k + 1}`, r: 0.3 })) : undefined;
  return LifeCycleSchema.parse({
    stagewright: LIFE_CYCLE_SCHEMA_VERSION,
    name: `Size classes (${stages})`,
    census: "pre-breeding",
    timeStepUnit: "year",
    stages: ids.map((id, k) => ({ id, name: `Class ${k + 1}`, position: { x: 120 * k, y: 0 } })),
    rates,
    transitions,
    ...(correlations ? { correlations } : {}),
  });
}
