// Plain-language checks of a projection matrix, for biologists. Each finding
// names the stages concerned (by the names the user gave) and says what it
// means for the analysis. Structure (reducibility, primitivity, reachability)
// comes from the life-cycle graph (graph.ts), exactly; magnitudes (survival,
// block growth rates) from the numbers.
import { graphStructure, reachableFrom, type GraphStructure } from "./graph";
import { spectralRadiusDense } from "./eigen";
import { readSquareMatrix, readStageNames } from "./input";

export type Severity = "error" | "warning" | "info";

export type DiagnosticCode =
  | "non-finite-entry"
  | "negative-entry"
  | "survival-above-one"
  | "matrix-mismatch"
  | "zero-matrix"
  | "no-life-cycle-loop"
  | "single-stage"
  | "no-reproduction"
  | "unreachable-from-reproduction"
  | "no-future-reproduction"
  | "reducible"
  | "shared-dominant-eigenvalue"
  | "dominant-block-not-reproducing"
  | "imprimitive"
  | "not-converged"
  | "second-eigenvalue-not-converged";

export interface Diagnostic {
  readonly code: DiagnosticCode;
  readonly severity: Severity;
  /** One or two plain sentences naming the stages. */
  readonly message: string;
  /** Stages concerned, as 0-based indices. */
  readonly stages: number[];
}

/** One strongly connected group of stages (a diagonal block after reordering). */
export interface BlockReport {
  /** 0-based stage indices. */
  readonly stages: number[];
  /** The block's own dominant eigenvalue (per projection interval); 0 for a stage with no loop. */
  readonly spectralRadius: number;
  /** gcd of the block's loop lengths, or null when it has no loop. */
  readonly period: number | null;
  /** True when λ of the whole matrix comes from this block. */
  readonly dominant: boolean;
}

export interface StructureReport {
  readonly irreducible: boolean;
  /** Irreducible with period 1: the stage structure converges to w from any start. */
  readonly primitive: boolean;
  /** Index of imprimitivity (of the whole matrix, or of the block λ comes from); null without any loop. */
  readonly period: number | null;
  /** Strongly connected groups, upstream groups first. */
  readonly blocks: BlockReport[];
  /** Index into blocks of the (first) block λ comes from; null when λ = 0. */
  readonly dominantBlock: number | null;
}

/** Everything the checks need, computed once by the caller. */
export interface DiagnosticContext {
  readonly n: number;
  readonly a: Float64Array;
  readonly u: Float64Array | null;
  readonly f: Float64Array | null;
  readonly names: readonly string[];
  readonly structure: GraphStructure;
  /** Spectral radius of each component of `structure`, in the same order. */
  readonly blockRadii: readonly number[];
}

/** Relative tolerance for "two blocks have the same growth rate". */
const SAME_RATE = 1e-10;

/** Spectral radius of each strongly connected component (the whole-matrix λ is reused when irreducible). */
export function blockSpectralRadii(a: Float64Array, n: number, structure: GraphStructure, lambdaWhole?: number): number[] {
  if (structure.components.length === 1 && lambdaWhole !== undefined) return [lambdaWhole];
  return structure.components.map((comp, c) => {
    if (!structure.componentHasCycle[c]) return 0;
    const k = comp.length;
    if (k === 1) return a[(comp[0] as number) * n + (comp[0] as number)] as number;
    const sub = new Float64Array(k * k);
    for (let r = 0; r < k; r++) {
      const i = comp[r] as number;
      for (let s = 0; s < k; s++) sub[r * k + s] = a[i * n + (comp[s] as number)] as number;
    }
    return spectralRadiusDense(sub, k).value;
  });
}

/** Structure summary: blocks, their growth rates, and which one λ comes from. */
export function structureReport(structure: GraphStructure, blockRadii: readonly number[]): StructureReport {
  const lambda = Math.max(0, ...blockRadii);
  const dominant = blockRadii.map((r) => lambda > 0 && r >= lambda * (1 - SAME_RATE));
  const dominantBlock = dominant.indexOf(true);
  const blocks = structure.components.map((comp, c) => ({
    stages: [...comp],
    spectralRadius: blockRadii[c] as number,
    period: structure.componentPeriod[c] as number | null,
    dominant: dominant[c] as boolean,
  }));
  const period = dominantBlock >= 0 ? (structure.componentPeriod[dominantBlock] ?? null) : null;
  return {
    irreducible: structure.irreducible,
    primitive: structure.irreducible && period === 1,
    period,
    blocks,
    dominantBlock: dominantBlock >= 0 ? dominantBlock : null,
  };
}

/** True when no finding is an error or a warning: λ, w, v and the damping ratio mean what they usually mean. */
export function isSound(diagnostics: readonly Diagnostic[]): boolean {
  return diagnostics.every((d) => d.severity === "info");
}

/** All checks on a validated matrix (and U, F when given). */
export function diagnoseDense(ctx: DiagnosticContext): Diagnostic[] {
  const { n, a, u, f, names, structure, blockRadii } = ctx;
  const out: Diagnostic[] = [];

  for (const [label, m] of [["A", a], ["U", u], ["F", f]] as const) {
    if (m !== null) negativeEntries(out, label, m, n, names);
  }
  if (u !== null) survivalAboveOne(out, u, n, names);
  if (u !== null && f !== null) mismatch(out, a, u, f, n, names);

  let allZero = true;
  for (let k = 0; k < n * n; k++) if (a[k] !== 0) allZero = false;
  if (allZero) {
    out.push({
      code: "zero-matrix",
      severity: "error",
      message: "Every entry of the matrix is zero: no individual survives or reproduces, so there is no growth rate, stage structure or sensitivity to analyse.",
      stages: range(n),
    });
    return out;
  }
  if (n === 1) {
    out.push({
      code: "single-stage",
      severity: "info",
      message: `The model has a single stage (${names[0]}): λ is the matrix entry itself, the stable stage distribution and reproductive value are both 1, and there is no second eigenvalue, so no damping ratio or transient dynamics.`,
      stages: [0],
    });
  }
  if (!structure.hasCycle) {
    out.push({
      code: "no-life-cycle-loop",
      severity: "error",
      message: `No stage can ever lead back to itself, so every cohort is gone within ${n} step${n === 1 ? "" : "s"}: λ = 0 and there is no stable stage distribution, reproductive value or sensitivity. Check that reproduction and stasis entries are filled in.`,
      stages: range(n),
    });
    return out;
  }

  const report = structureReport(structure, blockRadii);
  const lambda = Math.max(...blockRadii);
  
  // Reproduction-based reachability (needs F to know which stages reproduce).
  const reproducing: number[] = [];
  if (f !== null) {
    for (let j = 0; j < n; j++) {
      for (let i = 0; i < n; i++) {
        if ((f[i * n + j] as number) > 0) {
          reproducing.push(j);
          break;
        }
      }
    }
    if (reproducing.length === 0) {
      out.push({
        code: "no-reproduction",
        severity: "warning",
        message: "F has no positive entry: no stage reproduces, so λ reflects survival alone and the population cannot persist.",
        stages: [],
      });
    } else {
      const reached = reachableFrom(structure.graph(), reproducing, 1);
      const unreached = range(n).filter((s) => reached[s] === 0);
      if (unreached.length > 0) {
        out.push({
          code: "unreachable-from-reproduction",
          severity: "warning",
          message: `${capitalise(list(unreached, names))} can never be entered through reproduction and growth: ${unreached.length === 1 ? "this stage holds" : "these stages hold"} only the individuals present at the start and ${unreached.length === 1 ? "vanishes" : "vanish"} from the long-run population.`,
          stages: unreached,
        });
      }
      const canReproduce = reachableFrom(structure.reverse(), reproducing, 0);
      const barren = range(n).filter((s) => canReproduce[s] === 0);
      if (barren.length > 0) {
        const dom = report.dominantBlock === null ? [] : (report.blocks[report.dominantBlock]?.stages ?? []);
        const zeroV = dom.some((s) => reproducing.includes(s));
        out.push({
          code: "no-future-reproduction",
          severity: "info",
          message: `${capitalise(list(barren, names))} cannot reproduce or lead to a stage that does (for example post-reproductive individuals)${zeroV ? ", so the reproductive value is 0" : ""}. This is common and not an error.`,
          stages: barren,
        });
      }
    }
  }

  if (!structure.irreducible) reducibility(out, ctx, report, lambda, reproducing, f !== null);

  const dom = report.dominantBlock === null ? null : report.blocks[report.dominantBlock];
  const sharing = report.blocks.filter((b) => b.dominant).length;
  if (dom && sharing === 1 && dom.period !== null && dom.period > 1) {
    const d = dom.period;
    const where = structure.irreducible ? "The life cycle is irreducible but imprimitive" : `The group of stages λ comes from (${list(dom.stages, names)}) is imprimitive`;
    out.push({
      code: "imprimitive",
      severity: "warning",
      message: `${where}: every loop in the life-cycle graph has a length that is a multiple of ${d} (as when only the last age class reproduces). The stage structure keeps oscillating with period ${d} and never converges to the stable stage distribution; the damping ratio is 1.`,
      stages: [...dom.stages],
    });
  }
  return out;
}

function reducibility(out: Diagnostic[], ctx: DiagnosticContext, report: StructureReport, lambda: number, reproducing: number[], haveF: boolean): void {
  const { n, names, structure } = ctx;
  const blocks = report.blocks;
  const dominant = blocks.filter((b) => b.dominant);
  const groups = blocks.map((b, k) => `(${k + 1}) ${list(b.stages, names)}`).join("; ");
  const parts: string[] = [
    `The life cycle is reducible: its stages form ${blocks.length} groups that do not all lead to one another — ${groups}.`,
  ];
  let severity: Severity = "info";
  if (dominant.length === 1) {
    const d = dominant[0] as BlockReport;
    parts.push(`λ = ${fmt(lambda)} comes from group (${blocks.indexOf(d) + 1}).`);
    const downstream = reachableFrom(structure.graph(), d.stages, 0);
    const upstreamOrApart = range(n).filter((s) => downstream[s] === 0);
    if (upstreamOrApart.length > 0) {
      severity = "warning";
      parts.push(`${capitalise(list(upstreamOrApart, names))} cannot be reached from that group, so ${upstreamOrApart.length === 1 ? "it has" : "they have"} no share in the stable stage distribution.`);
    }
    const toDominant = reachableFrom(structure.reverse(), d.stages, 0);
    const noReturn = range(n).filter((s) => toDominant[s] === 0);
    if (noReturn.length > 0) {
      parts.push(`${capitalise(list(noReturn, names))} cannot lead back to it, so ${noReturn.length === 1 ? "its" : "their"} reproductive value is 0.`);
    }
    let other = -1;
    blocks.forEach((b, k) => {
      if (!b.dominant && b.spectralRadius > 0 && (other < 0 || b.spectralRadius > (blocks[other] as BlockReport).spectralRadius)) other = k;
    });
    if (other >= 0) {
      const ob = blocks[other] as BlockReport;
      parts.push(
        `The damping ratio may reflect another group rather than the main life cycle: group (${other + 1}) has its own growth rate ${fmt(ob.spectralRadius)}, so the damping ratio is at most ${fmt(lambda / ob.spectralRadius)}.`,
      );
    }
    if (haveF && !d.stages.some((s) => reproducing.includes(s))) {
      out.push({
        code: "dominant-block-not-reproducing",
        severity: "warning",
        message: `λ = ${fmt(lambda)} comes from ${list(d.stages, names)}, a group in which no stage reproduces: the long-run growth rate reflects their survival (for example long-lived post-breeders), not the growth of the breeding population.`,
        stages: [...d.stages],
      });
    }
  } else {
    severity = "warning";
    const which = dominant.map((b) => `(${blocks.indexOf(b) + 1})`).join(" and ");
    out.push({
      code: "shared-dominant-eigenvalue",
      severity: "warning",
      message: `Groups ${which} have the same growth rate λ = ${fmt(lambda)}. λ is then a repeated eigenvalue: the long-run stage structure depends on the initial population, the damping ratio is 1, and sensitivities and elasticities are not defined.`,
      stages: dominant.flatMap((b) => b.stages).sort((p, q) => p - q),
    });
  }
  out.push({ code: "reducible", severity, message: parts.join(" "), stages: range(n) });
}

function negativeEntries(out: Diagnostic[], label: string, m: Float64Array, n: number, names: readonly string[]): void {
  const where: [number, number][] = [];
  for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) if ((m[i * n + j] as number) < 0) where.push([i, j]);
  if (where.length === 0) return;
  const [i, j] = where[0] as [number, number];
  const count = where.length === 1 ? "a negative entry" : `${where.length} negative entries`;
  out.push({
    code: "negative-entry",
    severity: "error",
    message: `${label} has ${count}${where.length > 1 ? ", for example" : ":"} the rate from ${names[j]} to ${names[i]} (row ${i + 1}, column ${j + 1}) is ${fmt(m[i * n + j] as number)}. Survival, growth and fertility rates cannot be negative.`,
    stages: uniqueStages(where),
  });
}

function survivalAboveOne(out: Diagnostic[], u: Float64Array, n: number, names: readonly string[]): void {
  const bad: number[] = [];
  const sums: number[] = [];
  for (let j = 0; j < n; j++) {
    let s = 0;
    for (let i = 0; i < n; i++) s += u[i * n + j] as number;
    if (s > 1 + 1e-9) {
      bad.push(j);
      sums.push(s);
    }
  }
  if (bad.length === 0) return;
  const each = bad.map((j, k) => `${names[j]} (${fmt(sums[k] as number)})`);
  out.push({
    code: "survival-above-one",
    severity: "error",
    message: `Survival out of ${joinWords(each)} is above 1 (the column sum of U). A survival probability cannot exceed 1: more individuals would leave the stage alive than were in it.`,
    stages: bad,
  });
}

function mismatch(out: Diagnostic[], a: Float64Array, u: Float64Array, f: Float64Array, n: number, names: readonly string[]): void {
  const where: [number, number][] = [];
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const k = i * n + j;
      const sum = (u[k] as number) + (f[k] as number);
      if (Math.abs((a[k] as number) - sum) > 1e-9 * Math.max(1, Math.abs(a[k] as number))) where.push([i, j]);
    }
  }
  if (where.length === 0) return;
  const [i, j] = where[0] as [number, number];
  const k = i * n + j;
  out.push({
    code: "matrix-mismatch",
    severity: "error",
    message: `A differs from U + F in ${where.length === 1 ? "one entry" : `${where.length} entries`}${where.length > 1 ? ", for example" : ":"} the rate from ${names[j]} to ${names[i]} (row ${i + 1}, column ${j + 1}) is ${fmt(a[k] as number)} in A but ${fmt((u[k] as number) + (f[k] as number))} in U + F.`,
    stages: uniqueStages(where),
  });
}

/**
 * Check a matrix (and optional U, F) and explain what is unusual about it,
 * naming stages. Throws MatrixInputError only for shapes that cannot be read
 * (not square, ragged, empty); NaN and ±Infinity entries are reported as
 * errors, and then `structure` is null because nothing numeric can be said.
 */
export function diagnoseMatrix(input: {
  readonly A: unknown;
  readonly U?: unknown;
  readonly F?: unknown;
  readonly stageNames?: unknown;
}): { diagnostics: Diagnostic[]; isSound: boolean; structure: StructureReport | null } {
  const lenient = { allowNonFinite: true };
  const A = readSquareMatrix(input.A, "A", undefined, lenient);
  const n = A.n;
  const a = A.data;
  const U = input.U === undefined ? null : readSquareMatrix(input.U, "U", n, lenient);
  const F = input.F === undefined ? null : readSquareMatrix(input.F, "F", n, lenient);
  const names = readStageNames(input.stageNames, n);
  const broken: Diagnostic[] = [];
  for (const [label, m] of [["A", A], ["U", U], ["F", F]] as const) {
    if (m === null || m.nonFinite.length === 0) continue;
    const [i, j] = m.nonFinite[0] as [number, number];
    const count = m.nonFinite.length === 1 ? "an entry that is not a finite number" : `${m.nonFinite.length} entries that are not finite numbers`;
    broken.push({
      code: "non-finite-entry",
      severity: "error",
      message: `${label} has ${count} (missing, NaN or infinite)${m.nonFinite.length > 1 ? ", for example" : ":"} the rate from ${names[j]} to ${names[i]} (row ${i + 1}, column ${j + 1}). Every rate must be a number before the model can be analysed.`,
      stages: uniqueStages(m.nonFinite),
    });
  }
  if (broken.length > 0) {
    for (const [label, m] of [["A", A], ["U", U], ["F", F]] as const) if (m !== null) negativeEntries(broken, label, m.data, n, names);
    return { diagnostics: broken, isSound: false, structure: null };
  }
  const u = U?.data ?? null;
  const f = F?.data ?? null;
  const structure = graphStructure(a, n);
  const blockRadii = blockSpectralRadii(a, n, structure);
  const diagnostics = diagnoseDense({ n, a, u, f, names, structure, blockRadii });
  return { diagnostics, isSound: isSound(diagnostics), structure: structureReport(structure, blockRadii) };
}

function range(n: number): number[] {
  return Array.from({ length: n }, (_, i) => i);
}

function uniqueStages(pairs: readonly [number, number][]): number[] {
  return [...new Set(pairs.flat())].sort((p, q) => p - q);
}

/** "a", "a and b", "a, b and c", "a, b, c, d, e and 7 more". */
function list(stages: readonly number[], names: readonly string[]): string {
  const shown = stages.length > 6 ? stages.slice(0, 5) : stages;
  const words = shown.map((s) => names[s] as string);
  if (stages.length > 6) words.push(`${stages.length - 5} more`);
  return joinWords(words);
}

function joinWords(words: readonly string[]): string {
  if (words.length <= 1) return words[0] ?? "";
  return `${words.slice(0, -1).join(", ")} and ${words[words.length - 1]}`;
}

function capitalise(s: string): string {
  return s.length === 0 ? s : (s[0] as string).toUpperCase() + s.slice(1);
}

/** Four significant digits, without trailing zeros. */
export function fmt(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(Number(x.toPrecision(4)));
}
