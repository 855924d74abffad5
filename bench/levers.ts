// Benchmark of the Levers ranking (shared/levers/ranking.ts) on the server's
// code path: prepare the life cycle (compile, analyse, vital-rate
// sensitivities) and rank every lever by its exact Δλ for +10 % and −10 %.
// Run: node --import tsx bench/levers.ts
//
// Case: an invented size-classified life cycle with 50 size classes and 100
// named vital rates — survival s_k and growth g_k per class (stasis
// s_k·(1 − g_k), growth s_k·g_k; the last class only survives) and one
// fecundity f shared by reproduction from classes 31–50, scaled by class —
// 119 arrows, so 100 rate levers and 119 entry levers, each recomputed twice.
// Budget: ≤ 200 ms. Reference in the same run: the same exact Δλ obtained
// by running the full analyzeMatrix on every changed matrix (what a naive
// implementation would do). Wall and CPU time; median and fastest of the
// rounds (the machine is shared). Nothing is asserted.
import { analyzeMatrix } from "../shared/demography";
import { LIFE_CYCLE_SCHEMA_VERSION, LifeCycleSchema, type LifeCycle } from "../shared/lifecycle";
import { leverModel, rankLevers } from "../shared/levers";
import { seededRandom } from "./matrices";

const CLASSES = 50;
const ROUNDS = 15;

function sizeClassLifeCycle(): LifeCycle {
  const r = seededRandom(20261202);
  const stages = Array.from({ length: CLASSES }, (_, k) => ({ id: `st_${k + 1}`, name: `Size ${k + 1}`, position: { x: 150 * k, y: 0 } }));
  const rates = [
    ...Array.from({ length: CLASSES }, (_, k) => ({ id: `vr_s${k + 1}`, name: `s_${k + 1}`, value: Number((0.55 + 0.4 * (k / CLASSES) + 0.03 * r()).toFixed(4)) })),
    ...Array.from({ length: CLASSES - 1 }, (_, k) => ({ id: `vr_g${k + 1}`, name: `g_${k + 1}`, value: Number((0.15 + 0.25 * r()).toFixed(4)) })),
    { id: "vr_f", name: "f", value: 0.35 },
  ];
  const transitions: LifeCycle["transitions"] = [];
  for (let k = 1; k <= CLASSES; k++) {
    const last = k === CLASSES;
    transitions.push({ id: `tr_st${k}`, from: `st_${k}`, to: `st_${k}`, kind: "stasis", rate: last ? `s_${k}` : `s_${k} * (1 - g_${k})` });
    if (!last) transitions.push({ id: `tr_gr${k}`, from: `st_${k}`, to: `st_${k + 1}`, kind: "growth", rate: `s_${k} * g_${k}` });
    if (k > 30) transitions.push({ id: `tr_re${k}`, from: `st_${k}`, to: "st_1", kind: "reproduction", rate: `f * ${(k / 10).toFixed(1)}` });
  }
  return LifeCycleSchema.parse({ stagewright: LIFE_CYCLE_SCHEMA_VERSION, name: "Fifty size classes", census: "pre-breeding", timeStepUnit: "year", stages, rates, transitions });
}

function stats(xs: number[]): { median: number; min: number } {
  const s = [...xs].sort((a, b) => a - b);
  return { median: s[Math.floor(s.length / 2)]!, min: s[0]! };
}

function time<T>(fn: () => T): { wall: number; cpu: number; out: T } {
  const c0 = process.cpuUsage();
  const t0 = performance.now();
  const out = fn();
  const wall = performance.now() - t0;
  const c = process.cpuUsage(c0);
  return { wall, cpu: (c.user + c.system) / 1000, out };
}

const doc = sizeClassLifeCycle();
const rank = () => rankLevers(leverModel(doc), { relativeChange: 0.1 });
const first = rank();
const rateRows = first.rows.filter((r) => r.kind === "rate").length;
const entryRows = first.rows.length - rateRows;
console.log(`Levers ranking: ${CLASSES} stages, ${doc.rates.length} vital rates, ${doc.transitions.length} arrows → ${rateRows} rate levers + ${entryRows} entry levers, ±10 % each; λ = ${first.lambda.toFixed(4)}`);

// Reference: the same Δλ by full analyzeMatrix on each changed matrix.
function reference(): number {
  const model = leverModel(doc);
  const n = model.n;
  let worst = 0;
  const out = new Float64Array(n * n);
  const rows = (a: Float64Array) => Array.from({ length: n }, (_, i) => Array.from(a.subarray(i * n, i * n + n)));
  for (const row of first.rows) {
    for (const step of [row.increase, row.decrease]) {
      const ok = row.kind === "rate" ? model.rateMatrixAt(model.rates.find((x) => x.rateId === row.rateId)!.slot, step.to, out) : model.entryMatrixAt(...cellOf(model, row.key), step.to, out);
      if (!ok) continue;
      const lambda = analyzeMatrix({ A: rows(out) }).lambda;
      worst = Math.max(worst, Math.abs(lambda - model.lambda - step.deltaLambda!));
    }
  }
  return worst;
}
function cellOf(model: ReturnType<typeof leverModel>, key: string): [number, number] {
  const e = model.entries.find((x) => x.key === key)!;
  return [e.row, e.col];
}

for (let k = 0; k < 3; k++) rank();
const wall: number[] = [];
const cpu: number[] = [];
for (let k = 0; k < ROUNDS; k++) {
  const t = time(rank);
  wall.push(t.wall);
  cpu.push(t.cpu);
}
const w = stats(wall);
const c = stats(cpu);
console.log(`Stagewright ranking (prepare + ${2 * first.rows.length} exact λ): median ${w.median.toFixed(1)} ms wall (fastest ${w.min.toFixed(1)}), median ${c.median.toFixed(1)} ms CPU over ${ROUNDS} rounds; budget 200 ms`);

const ref = time(reference);
console.log(`Reference (full analyzeMatrix per changed matrix): ${ref.wall.toFixed(0)} ms wall, ${ref.cpu.toFixed(0)} ms CPU, one round; largest |Δλ difference| = ${ref.out.toExponential(2)}`);
