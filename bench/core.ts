// Benchmark of the full matrix analysis (λ, w, v, S, E, λ₂, diagnostics) against
// ml-matrix's full eigendecomposition and, when python3 with numpy is present,
// numpy's LAPACK eig on the same matrices. Run: node --import tsx bench/core.ts
// Budgets (2-core machine): ≤ 0.05 ms at n = 10, faster than numpy at n ≥ 50,
// ≤ 150 ms at n = 500. Medians over batches; nothing here is asserted by tests.
import { spawnSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { EigenvalueDecomposition, Matrix } from "ml-matrix";
import { analyzeMatrix } from "../shared/demography/index";
import { randomPrimitive, sizeKernel } from "./matrices";

interface Case {
  readonly label: string;
  readonly n: number;
  readonly matrices: number[][][];
}

const cases: Case[] = [];
for (const n of [10, 50, 200, 500]) {
  cases.push({ label: `random n=${n}`, n, matrices: [1, 2, 3, 4].map((k) => randomPrimitive(n, 1000 * n + k)) });
}
for (const n of [200, 500]) cases.push({ label: `size kernel n=${n}`, n, matrices: [sizeKernel(n)] });

interface Timing {
  /** Median wall-clock seconds per call. */
  readonly wall: number;
  /** Median CPU seconds per call (user + system of this process). */
  readonly cpu: number;
}

/**
 * Seconds per call in steady state: warm up for at least `warm` seconds (V8
 * optimises a function only after many calls; a server calls this one
 * thousands of times), then time batches of at least `minBatch` seconds each.
 * Both wall-clock and CPU time are taken per batch: on a shared machine the
 * wall clock also counts time spent waiting for a core, CPU time does not,
 * and on an idle machine the two agree for single-threaded code.
 */
function timeIt(run: (k: number) => void, count: number, minBatch = 0.02, budget = 3, warm = 0.5): Timing {
  let k = 0;
  const warmStart = performance.now();
  do run(k++ % count);
  while ((performance.now() - warmStart) / 1000 < warm);
  let t0 = performance.now();
  run(k++ % count);
  const one = Math.max((performance.now() - t0) / 1000, 1e-7);
  const perBatch = Math.max(1, Math.floor(minBatch / one));
  const batches = Math.max(3, Math.min(25, Math.floor(budget / (one * perBatch))));
  const wall: number[] = [];
  const cpu: number[] = [];
  for (let b = 0; b < batches; b++) {
    const c0 = process.cpuUsage();
    t0 = performance.now();
    for (let r = 0; r < perBatch; r++) run(k++ % count);
    wall.push((performance.now() - t0) / 1000 / perBatch);
    const c = process.cpuUsage(c0);
    cpu.push((c.user + c.system) / 1e6 / perBatch);
  }
  const median = (x: number[]): number => x.sort((p, q) => p - q)[Math.floor(x.length / 2)] as number;
  return { wall: median(wall), cpu: median(cpu) };
}

/** The same quantities from ml-matrix's dense eigendecomposition of A and Aᵀ. */
function mlMatrixAnalysis(A: number[][]): number {
  const n = A.length;
  const M = new Matrix(A);
  const e = new EigenvalueDecomposition(M);
  const re = e.realEigenvalues;
  let k = 0;
  for (let i = 1; i < n; i++) if ((re[i] as number) > (re[k] as number)) k = i;
  const lambda = re[k] as number;
  const w = e.eigenvectorMatrix.getColumn(k);
  const et = new EigenvalueDecomposition(M.transpose());
  let kt = 0;
  for (let i = 1; i < n; i++) if ((et.realEigenvalues[i] as number) > (et.realEigenvalues[kt] as number)) kt = i;
  const v = et.eigenvectorMatrix.getColumn(kt);
  let vw = 0;
  for (let i = 0; i < n; i++) vw += (v[i] as number) * (w[i] as number);
  let check = 0;
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const s = ((v[i] as number) * (w[j] as number)) / vw;
      check += ((A[i] as number[])[j] as number) * s / lambda;
    }
  }
  return check;
}

const hasNumpy = spawnSync("python3", ["-c", "import numpy"], { encoding: "utf8" }).status === 0;
const numpyLabels = new Set<string>();

/**
 * numpy timings for one case, run right after the TypeScript timings of the
 * same case so both see the same machine load. OPENBLAS_CORETYPE and
 * OPENBLAS_L2_SIZE may be set on this machine for old OpenBLAS builds; they
 * slow a current numpy, so both are unset for this command only. Default
 * threading and one thread are both timed; the faster is the reference.
 */
function numpyTimes(c: Case): { threaded?: { wall: number; cpu: number }; single?: { wall: number; cpu: number } } {
  if (!hasNumpy) return {};
  const dir = mkdtempSync(join(tmpdir(), "stagewright-bench-"));
  const file = join(dir, "cases.json");
  writeFileSync(file, JSON.stringify({ minBatchSeconds: 0.02, cases: [{ label: c.label, matrices: c.matrices }] }));
  const out: { threaded?: { wall: number; cpu: number }; single?: { wall: number; cpu: number } } = {};
  try {
    for (const threads of ["default", "1"] as const) {
      const env: NodeJS.ProcessEnv = { ...process.env };
      delete env.OPENBLAS_CORETYPE;
      delete env.OPENBLAS_L2_SIZE;
      if (threads === "1") env.OPENBLAS_NUM_THREADS = "1";
      const r = spawnSync("python3", [join(import.meta.dirname, "core_numpy.py"), file], { encoding: "utf8", env, maxBuffer: 1 << 26 });
      if (r.status !== 0) {
        console.log(`numpy run (${threads} threads) failed: ${r.stderr.trim().split("\n").pop()}`);
        continue;
      }
      const parsed = JSON.parse(r.stdout) as { numpy: string; blas: Record<string, unknown>; results: Record<string, { wall: number; cpu: number }> };
      numpyLabels.add(`numpy ${parsed.numpy}, OpenBLAS core ${String(parsed.blas.core ?? "?")}, threads ${String(parsed.blas.threads ?? "?")}`);
      const t = parsed.results[c.label];
      if (threads === "1") out.single = t;
      else out.threaded = t;
    }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  return out;
}

const ms = (s: number | undefined): string => (s === undefined ? "—" : (s * 1000).toFixed(s < 1e-3 ? 4 : 2));
const ratio = (a: number | undefined, b: number): string => (a === undefined ? "—" : `${(a / b).toFixed(1)}×`);

interface Row {
  readonly label: string;
  readonly n: number;
  readonly core: Timing;
  readonly ml: Timing;
  readonly np: { threaded?: Timing; single?: Timing };
}
const rows: Row[] = [];
for (const c of cases) {
  // Sanity: every benchmark matrix must converge.
  for (const A of c.matrices) {
    const r = analyzeMatrix({ A });
    if (!r.converged) throw new Error(`${c.label}: not converged`);
  }
  const core = timeIt((k) => void analyzeMatrix({ A: c.matrices[k] as number[][] }), c.matrices.length);
  const ml = timeIt((k) => void mlMatrixAnalysis(c.matrices[k] as number[][]), c.matrices.length, 0.02, 4, c.n >= 200 ? 0 : 0.5);
  rows.push({ label: c.label, n: c.n, core, ml, np: numpyTimes(c) });
}

console.log("Full analysis (λ, w, v, S, E, λ₂, diagnostics) per matrix, ms, medians over batches.");
console.log("CPU = CPU time of the process (what the budgets are checked on: equal to the wall clock on an idle");
console.log("machine, and unaffected by other work on a shared one); wall = wall clock. Ratios: reference CPU / Stagewright CPU.");
if (hasNumpy) console.log([...numpyLabels].join("; "));
else console.log("numpy: python3 with numpy not found, columns skipped");
console.log("| case | Stagewright CPU (wall) | ml-matrix EVD(A)+EVD(Aᵀ) CPU | numpy 1 thread CPU (wall) | numpy default threads wall | vs ml-matrix | vs numpy | budget |");
console.log("|---|---:|---:|---:|---:|---:|---:|---|");
for (const r of rows) {
  const np1 = r.np.single;
  let budget = "";
  if (r.n === 10) budget = r.core.cpu <= 0.05e-3 ? "≤ 0.05 ms: met" : "≤ 0.05 ms: MISSED";
  else if (r.n === 500) budget = r.core.cpu <= 0.15 ? "≤ 150 ms: met" : "≤ 150 ms: MISSED";
  if (r.n >= 50 && np1 !== undefined) budget += `${budget ? "; " : ""}${r.core.cpu < np1.cpu ? "faster than numpy" : "SLOWER than numpy"}`;
  console.log(
    `| ${r.label} | ${ms(r.core.cpu)} (${ms(r.core.wall)}) | ${ms(r.ml.cpu)} | ${ms(np1?.cpu)} (${ms(np1?.wall)}) | ${ms(r.np.threaded?.wall)} | ${ratio(r.ml.cpu, r.core.cpu)} | ${ratio(np1?.cpu, r.core.cpu)} | ${budget} |`,
  );
}
