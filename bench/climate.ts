// Benchmark of λ(T) on the server: 200 temperatures for a 20-stage life cycle
// whose every survival rate and fecundity carries a thermal response, as the
// POST /climate/lambda service computes it (curve, persistence window edges
// by Brent's method, optimum, dλ/dT). Reference in the same run: the naive
// path through the public API (rate overrides → buildMatrices → dominantEigen)
// at the same 200 temperatures, without edges or optimum. Also times one
// warming-Run replicate (100 years), which sizes the Run's chunks.
// Run: npm run bench:climate. Budget: ≤ 100 ms for the 200 temperatures.
import { lambdaCurve, responseValue, simulateTrajectoryReplicates, thermalModel } from "../shared/climate/index";
import { dominantEigen } from "../shared/demography/index";
import { buildMatrices, LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, type LifeCycle } from "../shared/lifecycle/index";
import { climateLambda } from "../server/services/climate";

const N = 20;

/** An invented size-classified life cycle: stasis s_i(1 − g_i), growth s_i g_i, fecundity f_i from class 11. */
function lifeCycle(): LifeCycle {
  const stages = Array.from({ length: N }, (_, i) => ({ id: `st_${i}`, name: `Class ${i + 1}`, position: { x: i * 120, y: 0 } }));
  const rates: object[] = [];
  const transitions: object[] = [];
  for (let i = 0; i < N; i++) {
    const s = 0.55 + (0.4 * i) / N;
    rates.push({ id: `vr_s${i}`, name: `s${i}`, value: s, thermal: { form: "arrhenius", appliesTo: "hazard", activationEnergy: 0.3 + 0.01 * i, referenceTemperature: 15, valueAtReference: -Math.log(s) } });
    rates.push({ id: `vr_g${i}`, name: `g${i}`, value: 0.7 });
    transitions.push({ id: `tr_st${i}`, from: `st_${i}`, to: `st_${i}`, kind: "stasis", rate: i === N - 1 ? `s${i}` : `s${i} * (1 - g${i})` });
    if (i < N - 1) transitions.push({ id: `tr_gr${i}`, from: `st_${i}`, to: `st_${i + 1}`, kind: "growth", rate: `s${i} * g${i}` });
    if (i >= 10) {
      rates.push({ id: `vr_f${i}`, name: `f${i}`, value: 0.5 + 0.1 * (i - 10), thermal: { form: "gaussian-quadratic", appliesTo: "rate", optimum: 14, width: 2.5, criticalMaximum: 27, valueAtOptimum: 30 + 5 * (i - 10) } });
      transitions.push({ id: `tr_f${i}`, from: `st_${i}`, to: "st_0", kind: "reproduction", rate: `f${i}` });
    }
  }
  return LifeCycleSchema.parse({ stagewright: LIFE_CYCLE_SCHEMA_VERSION, name: "Bench 20", census: "pre-breeding", timeStepUnit: "year", stages, rates, transitions });
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
}

/** Wall-clock and CPU ms per call, medians over `reps` calls after `warm` calls. */
function time(fn: () => void, reps: number, warm = 5): { wall: number; cpu: number } {
  for (let i = 0; i < warm; i++) fn();
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let i = 0; i < reps; i++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    fn();
    wall.push(performance.now() - t0);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1000);
  }
  return { wall: median(wall), cpu: median(cpu) };
}

const doc = lifeCycle();
const range = { min: 0, max: 35 };
const result = climateLambda(doc, { range, points: 200 });
const w = result.window[0];
console.log(`λ(T) for a ${N}-stage life cycle with ${doc.rates.filter((r) => r.thermal).length} thermal responses, ${range.min}–${range.max} °C:`);
console.log(`  window ${w ? `${w.from.toFixed(3)}–${w.to.toFixed(3)} °C` : "none"}, optimum ${result.optimum!.temperature.toFixed(3)} °C (λ = ${result.optimum!.lambda.toFixed(4)}), dλ/dT ${result.slope.slope.toExponential(3)} per °C at ${result.slope.temperature.toFixed(2)} °C`);

// A cold start, as a server's first request after start-up pays it.
const c0 = performance.now();
climateLambda(lifeCycle(), { range, points: 200 });
const cold = performance.now() - c0;

const service = time(() => climateLambda(doc, { range, points: 200 }), 30);
const curveOnly = time(() => lambdaCurve(thermalModel(doc), { ...range, points: 200 }), 30);
const temps = result.temperatures;
const naive = time(() => {
  for (const T of temps) {
    const overrides: Record<string, number> = {};
    for (const r of doc.rates) if (r.thermal) overrides[r.id] = r.thermal.appliesTo === "hazard" ? Math.exp(-responseValue(r.thermal, T)) : responseValue(r.thermal, T);
    dominantEigen(buildMatrices(doc, overrides).A);
  }
}, 10, 2);
const model = thermalModel(doc);
const years = Array.from({ length: 100 }, (_, i) => 12 + 0.03 * i);
const replicate = time(() => simulateTrajectoryReplicates(model, years, 1, 1000, 10, 1, 0), 10, 2);

const fmt = (t: { wall: number; cpu: number }) => `${t.wall.toFixed(1)} ms wall, ${t.cpu.toFixed(1)} ms CPU`;
console.log(`POST /climate/lambda service, 200 temperatures (curve, window edges, optimum, dλ/dT): ${fmt(service)}   [budget ≤ 100 ms]`);
console.log(`  first call after start-up: ${cold.toFixed(1)} ms wall`);
console.log(`  λ(T) curve with window and optimum alone: ${fmt(curveOnly)}`);
console.log(`reference, 200 × (overrides → buildMatrices → dominantEigen), no edges or optimum: ${fmt(naive)}`);
console.log(`λ solver: ${model.perron.fallbacks} of the calls fell back to the full eigen-solver`);
console.log(`warming Run: 10 replicates × 100 years: ${fmt(replicate)} (${(replicate.wall / 10).toFixed(2)} ms per replicate)`);
