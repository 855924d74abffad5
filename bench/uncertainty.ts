// Benchmark of the Monte Carlo uncertainty Run: 10,000 draws of an invented
// 20-stage life cycle (bench/uncertainty-model.ts: 59 uncertain vital rates,
// neighbouring survivals correlated) through the exact code path the worker runs
// (server/runs/uncertainty.ts: prepare's checks, every chunk of the plan,
// partials through JSON as they are stored, then the merge). Budget: ≤ 2 s.
// Reference in the same run: the straightforward path — build the matrices
// and run the full analysis (analyzeMatrix + vital-rate sensitivities) per
// draw — timed on 1,000 draws and scaled to 10,000. The machine is shared:
// each side runs several times and the fastest and median runs are printed,
// with CPU time beside wall-clock time. Nothing is asserted.
// Run: npm run bench:uncertainty
import { analyzeMatrix, createRandom } from "../shared/demography/index";
import { monteCarloSetup, rateSampler } from "../shared/uncertainty/index";
import { drawsPerChunk, uncertaintyRun, type UncertaintyInput } from "../server/runs/uncertainty";
import type { MonteCarloPartial } from "../shared/uncertainty/index";
import { sizeClassLifeCycle } from "./uncertainty-model";

const STAGES = 20;
const DRAWS = 10_000;
const REPEATS = 5;
const REFERENCE_DRAWS = 1_000;

const doc = sizeClassLifeCycle(STAGES, { correlated: true });
const uncertain = doc.rates.filter((r) => r.se !== undefined).length;

function timed<T>(f: () => T): { wall: number; cpu: number; value: T } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const value = f();
  const wall = performance.now() - t0;
  const c = process.cpuUsage(c0);
  return { wall, cpu: (c.user + c.system) / 1000, value };
}

function workerRun(): number {
  const per = drawsPerChunk(STAGES);
  const chunkDraws: number[] = [];
  for (let left = DRAWS; left > 0; left -= per) chunkDraws.push(Math.min(per, left));
  const input: UncertaintyInput = { settings: { draws: DRAWS, seed: 1 }, document: doc, lifeCycleVersion: 1, chunkDraws };
  monteCarloSetup(doc); // prepare's check
  const partials = chunkDraws.map((_, k) => JSON.parse(JSON.stringify(uncertaintyRun.runChunk(input, k))) as MonteCarloPartial);
  const result = uncertaintyRun.merge(input, partials);
  return result.draws;
}

function reference(draws: number): void {
  const setup = monteCarloSetup(doc);
  const sample = rateSampler(setup);
  const rng = createRandom(1, 0);
  const values = Float64Array.from(setup.compiled.baseValues);
  for (let d = 0; d < draws; d++) {
    sample(rng, values);
    const m = setup.compiled.evaluate(values);
    const a = analyzeMatrix({ A: m.A, U: m.U, F: m.F });
    if (a.sensitivity) setup.compiled.vitalRateSensitivities(a.sensitivity, a.lambda, values);
  }
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const ms = (x: number) => `${(x / 1000).toFixed(2)} s`;

console.log(`Monte Carlo uncertainty: ${DRAWS.toLocaleString("en")} draws, ${STAGES} stages, ${doc.transitions.length} arrows, ${uncertain} uncertain rates, ${doc.correlations?.length ?? 0} correlations, ${Math.ceil(DRAWS / drawsPerChunk(STAGES))} chunks`);
workerRun(); // warm-up
reference(200);
const ours: { wall: number; cpu: number }[] = [];
const refs: { wall: number; cpu: number }[] = [];
for (let k = 0; k < REPEATS; k++) {
  ours.push(timed(workerRun));
  const r = timed(() => reference(REFERENCE_DRAWS));
  refs.push({ wall: (r.wall * DRAWS) / REFERENCE_DRAWS, cpu: (r.cpu * DRAWS) / REFERENCE_DRAWS });
}
const best = (xs: { wall: number; cpu: number }[]) => xs.reduce((a, b) => (b.wall < a.wall ? b : a));
console.log(`worker path (chunks + JSON + merge): fastest ${ms(best(ours).wall)} wall (${ms(best(ours).cpu)} CPU), median ${ms(median(ours.map((o) => o.wall)))} wall, median CPU ${ms(median(ours.map((o) => o.cpu)))}   budget 2.00 s`);
console.log(`reference (full analysis per draw, ×${DRAWS / REFERENCE_DRAWS} from ${REFERENCE_DRAWS.toLocaleString("en")} draws): fastest ${ms(best(refs).wall)} wall (${ms(best(refs).cpu)} CPU), median ${ms(median(refs.map((o) => o.wall)))} wall`);
console.log(`speed-up over the reference (fastest runs): ${(best(refs).wall / best(ours).wall).toFixed(1)}×`);
