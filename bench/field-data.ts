/**
 * Field-data budgets (issue: parse + estimate a 100,000-row stage-fate file
 * ≤ 3 s and ≤ 300 MB peak memory; 2,000 bootstrap resamples of 1,000
 * individuals with a 5-stage model ≤ 5 s). Run: npm run bench:fielddata.
 *
 * Parsing runs in a child process so its peak resident memory (maxRSS) is its
 * own; a child that loads the same modules and stops is the reference for
 * what Node and the modules alone take. Records are invented.
 */
import { spawnSync } from "node:child_process";
import fs from "node:fs";
import os from "node:os";
import path from "node:path";
import { fileURLToPath } from "node:url";
import { createRandom } from "../shared/demography";
import { bootstrapLambdas, estimateStageFates, groupByStage, type FateSample } from "../shared/fielddata";
import { checkUpload } from "../server/field-data/parse-upload";

const STAGES = ["seedling", "juvenile", "small", "medium", "large"];
// Column j: where a stage-j individual goes (stage index or −1 dead), cumulative probabilities.
const FATES: [number, number][][] = [
  [[-1, 0.5], [0, 0.7], [1, 1]],
  [[-1, 0.3], [1, 0.6], [2, 1]],
  [[-1, 0.2], [2, 0.6], [3, 0.95], [1, 1]],
  [[-1, 0.1], [3, 0.6], [4, 0.95], [2, 1]],
  [[-1, 0.08], [4, 0.97], [3, 1]],
];
const OFFSPRING = [0, 0, 0.5, 2, 5];

function drawFate(rng: ReturnType<typeof createRandom>, j: number): number {
  const u = rng.uniform();
  for (const [fate, p] of FATES[j]!) if (u < p) return fate;
  return -1;
}

function csv(rows: number, seed: number): string {
  const rng = createRandom(seed);
  const out = ["id,year,site,stage,fate,offspring"];
  for (let r = 0; r < rows; r++) {
    const j = Math.floor(rng.uniform() * 5);
    const f = drawFate(rng, j);
    out.push(`i${r},${2000 + (r % 20)},${r % 2 ? "North" : "South"},${STAGES[j]},${f < 0 ? "dead" : STAGES[f]},${rng.poisson(OFFSPRING[j]!)}`);
  }
  return out.join("\n");
}

async function child(mode: string, file: string) {
  // Read as the upload route receives it: the file's bytes in one Buffer (the parent wrote it, so building it costs the child nothing).
  const buffer = fs.readFileSync(file);
  if (mode === "reference") {
    console.log(JSON.stringify({ seconds: 0, maxRssMb: process.resourceUsage().maxRSS / 1024, bytes: buffer.length }));
    return;
  }
  const t0 = performance.now();
  const checked = await checkUpload(buffer, {
    kind: "stage-fates",
    name: "bench",
    mapping: { individual: "id", year: "year", stage: "stage", fate: "fate", offspring: "offspring", site: "site" },
    options: { delimiter: "auto", decimalComma: "auto", deadValue: "dead", stages: STAGES },
  });
  if (!checked.report.ok || checked.kind !== "stage-fates" || !checked.columns) throw new Error(`bench file refused: ${JSON.stringify(checked.report.problems.slice(0, 3))}`);
  const c = checked.columns;
  const e = estimateStageFates({ stages: c.stages, stage: c.stage, fate: c.fate, offspring: c.offspring }, { census: "pre-breeding" });
  const seconds = (performance.now() - t0) / 1000;
  console.log(JSON.stringify({ seconds, maxRssMb: process.resourceUsage().maxRSS / 1024, bytes: buffer.length, lambda: e.lambda }));
}

function runChild(mode: string, file: string): { seconds: number; maxRssMb: number; bytes: number; lambda?: number } {
  const r = spawnSync(process.execPath, ["--import", "tsx", fileURLToPath(import.meta.url), `--child=${mode}`, `--file=${file}`], { encoding: "utf8" });
  if (r.status !== 0) throw new Error(r.stderr);
  return JSON.parse(r.stdout.trim().split("\n").at(-1)!);
}

const childMode = process.argv.find((a) => a.startsWith("--child="))?.slice(8);
if (childMode) {
  await child(childMode, process.argv.find((a) => a.startsWith("--file="))!.slice(7));
} else {
  console.log("Field data benchmarks (2-core machine shared with other work; best of 3)\n");
  const file = path.join(fs.mkdtempSync(path.join(os.tmpdir(), "sw-bench-fielddata-")), "fates.csv");
  fs.writeFileSync(file, csv(100_000, 1));
  const ref = runChild("reference", file);
  const parses = [runChild("parse", file), runChild("parse", file), runChild("parse", file)];
  fs.rmSync(path.dirname(file), { recursive: true });
  const best = parses.reduce((a, b) => (a.seconds < b.seconds ? a : b));
  console.log(`Parse + check + estimate, 100,000 stage-fate rows (${(best.bytes / 1e6).toFixed(1)} MB CSV):`);
  console.log(`  wall clock ${parses.map((p) => p.seconds.toFixed(2)).join(" / ")} s (budget 3 s), λ = ${best.lambda?.toFixed(4)}`);
  console.log(`  peak RSS ${Math.max(...parses.map((p) => p.maxRssMb)).toFixed(0)} MB (budget 300 MB); reference: the same process (Node, tsx and the modules loaded) with the file read but not parsed ${ref.maxRssMb.toFixed(0)} MB`);

  // 1,000 individuals over 5 stages, 2,000 resamples, serially in one process (a Run spreads the 8 chunks over workers).
  const rng = createRandom(2);
  const m = 1000;
  const sample: FateSample = { stages: STAGES, stage: new Int32Array(m), fate: new Int32Array(m), offspring: new Float64Array(m) };
  for (let k = 0; k < m; k++) {
    const j = k % 5;
    sample.stage[k] = j;
    sample.fate[k] = drawFate(rng, j);
    sample.offspring[k] = rng.poisson(OFFSPRING[j]!);
  }
  const groups = groupByStage(sample);
  const times: number[] = [];
  for (let round = 0; round < 3; round++) {
    const t0 = performance.now();
    for (let chunk = 0; chunk < 8; chunk++) bootstrapLambdas(groups, { census: "pre-breeding", offspringSurvival: 1, newbornStage: 0 }, { seed: 3, stream: chunk, count: 250 });
    times.push((performance.now() - t0) / 1000);
  }
  // Reference in the same run: tallying the same draws without rebuilding the matrix or its λ.
  const t1 = performance.now();
  const draw = createRandom(3);
  let sink = 0;
  for (let b = 0; b < 2000; b++) for (let k = 0; k < m; k++) sink += sample.fate[Math.floor(draw.uniform32() * m)]!;
  const drawsOnly = (performance.now() - t1) / 1000;
  console.log(`\nBootstrap of λ, 2,000 resamples × 1,000 individuals, 5 stages:`);
  console.log(`  wall clock ${times.map((t) => t.toFixed(2)).join(" / ")} s (budget 5 s); reference: the 2,000,000 draws alone ${drawsOnly.toFixed(2)} s (${sink > 0 ? "" : ""}same generator)`);
}
