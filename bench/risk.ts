// Benchmark of the Risk simulation (shared/demography/stochastic.ts) against a
// vectorised numpy reference (bench/risk_numpy.py) in the same run.
// Run: node --import tsx bench/risk.ts
//
// Case: 10,000 replicates × 100 years × 10 stages, 5 matrices drawn
// independently each year with equal weights, quasi-extinction on the total.
// Two sets of 5 random primitive matrices: fully dense ones (every entry
// positive; the headline, since numpy's products are dense anyway) and
// stage-structured ones (stasis, growth, shrinkage, reproduction from the
// older half: 34 % non-zero, as life cycles are). Budget: Stagewright
// (single thread) at most half of numpy's time. numpy runs with
// OPENBLAS_CORETYPE and OPENBLAS_L2_SIZE unset (they slow a current numpy
// here). The machine is shared and often busy, so the two sides run in
// alternating rounds (numpy, ours, numpy, ours, …), each run after a
// warm-up, and the headline ratio is of the fastest runs (the least
// disturbed by other processes); medians and CPU times are printed too. Our
// year-by-year path (no tabulated block products) is timed for comparison.
// Nothing is asserted.
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import {
  analyzeMatrix,
  createRandom,
  mergeChunks,
  simulateChunk,
  type SimulationSettings,
  type SimulationTuning,
  type StochasticModel,
  type StochasticResult,
} from "../shared/demography/index";

const STAGES = 10;
const REPLICATES = 10_000;
const HORIZON = 100;
const ROUNDS = 4;
const REPEATS = 3;
const SEED = 7;
const TARGET_LAMBDAS = [0.92, 0.96, 1.0, 1.04, 1.08];

/** Scale A so that its dominant eigenvalue is `target`. */
function scaleTo(A: number[][], target: number): number[][] {
  const lambda = analyzeMatrix({ A }).lambda;
  return A.map((row) => row.map((a) => (a * target) / lambda));
}

function randomDense(k: number): number[][] {
  const rng = createRandom(1000 + k);
  const A = Array.from({ length: STAGES }, () => Array.from({ length: STAGES }, () => rng.uniform() + 1e-3));
  return scaleTo(A, TARGET_LAMBDAS[k]!);
}

function randomLifeCycle(k: number): number[][] {
  const rng = createRandom(2000 + k);
  const n = STAGES;
  const A = Array.from({ length: n }, () => new Array<number>(n).fill(0));
  for (let j = 0; j < n; j++) {
    const survival = 0.5 + 0.45 * rng.uniform();
    const grow = j < n - 1 ? 0.15 + 0.4 * rng.uniform() : 0;
    const shrink = j > 0 ? 0.05 * rng.uniform() : 0;
    A[j]![j] = survival * (1 - grow - shrink);
    if (j < n - 1) A[j + 1]![j] = survival * grow;
    if (j > 0) A[j - 1]![j] = survival * shrink;
    if (j >= n / 2 - 1) A[0]![j] = A[0]![j]! + 0.5 + 2 * rng.uniform();
  }
  return scaleTo(A, TARGET_LAMBDAS[k]!);
}

interface Case {
  readonly label: string;
  readonly matrices: number[][][];
}

const cases: Case[] = [
  { label: "dense random primitive 10×10", matrices: [0, 1, 2, 3, 4].map(randomDense) },
  { label: "stage-structured 10×10 (34 % non-zero)", matrices: [0, 1, 2, 3, 4].map(randomLifeCycle) },
];

const settings: SimulationSettings = {
  horizon: HORIZON,
  replicates: REPLICATES,
  initial: new Array<number>(STAGES).fill(10),
  demographic: false,
  threshold: { value: 50 },
  burnIn: 20,
};

function runOurs(c: Case, tuning: SimulationTuning = {}): { seconds: number[]; cpu: number[]; result: StochasticResult } {
  const model: StochasticModel = { kind: "independent", matrices: c.matrices.map((A) => ({ A })), weights: [0.2, 0.2, 0.2, 0.2, 0.2] };
  const once = (): StochasticResult =>
    mergeChunks(settings, [simulateChunk(model, settings, { seed: SEED, chunkIndex: 0, firstReplicate: 0, replicateCount: REPLICATES }, tuning)]);
  let result = once(); // warm-up (JIT)
  const seconds: number[] = [];
  const cpu: number[] = [];
  for (let r = 0; r < REPEATS; r++) {
    const c0 = process.cpuUsage();
    const t0 = performance.now();
    result = once();
    seconds.push((performance.now() - t0) / 1000);
    const used = process.cpuUsage(c0);
    cpu.push((used.user + used.system) / 1e6);
  }
  return { seconds, cpu, result };
}

interface NumpyCase {
  seconds: number[];
  cpu: number[];
  summary: { quasiExtinctionAtHorizon: number; meanFinal: number; logLambdaS: number; logLambdaSStandardError: number; medianFinal: number };
}

function runNumpy(): { version: string; blas: unknown; results: Record<string, NumpyCase> } | null {
  const env = { ...process.env };
  delete env.OPENBLAS_CORETYPE;
  delete env.OPENBLAS_L2_SIZE;
  const probe = spawnSync("python3", ["-c", "import numpy"], { encoding: "utf8", env });
  if (probe.status !== 0) return null;
  const dir = mkdtempSync(join(tmpdir(), "sw-risk-bench-"));
  try {
    const file = join(dir, "cases.json");
    const spec = {
      cases: cases.map((c) => ({
        label: c.label,
        matrices: c.matrices,
        weights: [0.2, 0.2, 0.2, 0.2, 0.2],
        initial: settings.initial,
        horizon: HORIZON,
        replicates: REPLICATES,
        threshold: settings.threshold.value,
        burnIn: settings.burnIn,
        repeats: REPEATS,
        seed: SEED,
      })),
    };
    writeFileSync(file, JSON.stringify(spec));
    const out = spawnSync("python3", [new URL("./risk_numpy.py", import.meta.url).pathname, file], { encoding: "utf8", env, maxBuffer: 64 * 1024 * 1024 });
    if (out.status !== 0) {
      process.stdout.write(`numpy reference failed:\n${out.stderr}\n`);
      return null;
    }
    const parsed = JSON.parse(out.stdout) as { numpy: string; blas: unknown; results: Record<string, NumpyCase> };
    return { version: parsed.numpy, blas: parsed.blas, results: parsed.results };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

const median = (xs: readonly number[]) => {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)]!;
};
const f3 = (x: number) => x.toFixed(3);

// Alternating rounds.
const ours = cases.map((c) => ({ c, seconds: [] as number[], cpu: [] as number[], yearly: [] as number[], result: null as StochasticResult | null }));
const theirs = new Map<string, NumpyCase>();
let numpyInfo: { version: string; blas: unknown } | null = null;
let numpyMissing = false;
for (let round = 0; round < ROUNDS; round++) {
  if (!numpyMissing) {
    const np = runNumpy();
    if (np === null) numpyMissing = true;
    else {
      numpyInfo = { version: np.version, blas: np.blas };
      for (const [label, r] of Object.entries(np.results)) {
        const prev = theirs.get(label);
        theirs.set(label, { seconds: [...(prev?.seconds ?? []), ...r.seconds], cpu: [...(prev?.cpu ?? []), ...r.cpu], summary: r.summary });
      }
    }
  }
  for (const o of ours) {
    const r = runOurs(o.c);
    o.seconds.push(...r.seconds);
    o.cpu.push(...r.cpu);
    o.result = r.result;
    o.yearly.push(...runOurs(o.c, { maxBlockYears: 1 }).seconds);
  }
}
const rss = process.resourceUsage().maxRSS;

console.log(`Stagewright Risk benchmark: ${REPLICATES.toLocaleString("en")} replicates × ${HORIZON} years × ${STAGES} stages, 5 matrices, equal weights; ${ROUNDS} alternating rounds of ${REPEATS} runs after a warm-up; headline ratio of the fastest runs.`);
console.log(`Node ${process.version}, single thread. ${numpyInfo ? `numpy ${numpyInfo.version}; BLAS ${JSON.stringify(numpyInfo.blas)}` : "numpy: not available"}`);
let headline: number | null = null;
for (const { c, seconds, cpu, yearly, result } of ours) {
  const t = Math.min(...seconds);
  const sim = result!.growthRate.simulated!;
  console.log(`\n${c.label}`);
  console.log(`  Stagewright: fastest ${f3(t)} s, median ${f3(median(seconds))} s, CPU median ${f3(median(cpu))} s; ${((t * 1e9) / (REPLICATES * HORIZON)).toFixed(0)} ns per replicate-year`);
  console.log(`    runs ${seconds.map(f3).join(", ")}`);
  console.log(`    year by year (no block products): fastest ${f3(Math.min(...yearly))} s, median ${f3(median(yearly))} s`);
  console.log(
    `    P(quasi-extinct by year ${HORIZON}) = ${f3(result!.quasiExtinction.share)}, log λs = ${sim.logLambdaS.toFixed(4)} ± ${(1.96 * sim.standardError).toFixed(4)}, Tuljapurkar ${result!.growthRate.approximation?.logLambdaS.toFixed(4) ?? "n/a"}, median final N = ${result!.finalAbundance.quantiles.find((q) => q.p === 0.5)!.value.toFixed(2)}`,
  );
  const np = theirs.get(c.label);
  if (np) {
    const tn = Math.min(...np.seconds);
    const ratio = t / tn;
    console.log(`  numpy:       fastest ${f3(tn)} s, median ${f3(median(np.seconds))} s, CPU median ${f3(median(np.cpu))} s`);
    console.log(`    runs ${np.seconds.map(f3).join(", ")}`);
    console.log(
      `  ours/numpy: fastest ${ratio.toFixed(2)} (budget ≤ 0.5), median ${(median(seconds) / median(np.seconds)).toFixed(2)}, CPU ${(median(cpu) / median(np.cpu)).toFixed(2)}; year by year ${(Math.min(...yearly) / tn).toFixed(2)}`,
    );
    const s = np.summary;
    console.log(
      `    numpy: P(quasi-extinct by year ${HORIZON}) = ${f3(s.quasiExtinctionAtHorizon)}, log λs = ${s.logLambdaS.toFixed(4)} ± ${(1.96 * s.logLambdaSStandardError).toFixed(4)}, median final N = ${s.medianFinal.toFixed(2)} (other random numbers: agreement within the intervals is expected)`,
    );
    if (headline === null) headline = ratio;
  }
}
console.log(`\nPeak RSS of the TypeScript process (numpy runs in its own process): ${(rss / 1024).toFixed(1)} MiB`);
if (headline !== null) console.log(`ratio to numpy: ${headline.toFixed(2)}`);
else console.log("ratio to numpy: n/a (numpy not available)");
