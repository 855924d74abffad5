/**
 * Row-by-row checking of uploaded field data: numbers (decimal point or
 * comma), census times (a year or an ISO date), and the rules of each kind of
 * dataset. The server streams parsed records through a checker; the checker
 * collects the clean columns and a list of problems (line, column, problem).
 * Nothing here reads files.
 */
import { FATE_DEAD, FATE_UNKNOWN } from "./estimate";

export interface RecordProblem {
  line: number;
  column: string | null;
  problem: string;
}

export const DELIMITER_CANDIDATES = [",", ";", "\t", "|"] as const;
export const delimiterName = (d: string) => (d === "\t" ? "a tab" : d === "," ? "a comma" : d === ";" ? "a semicolon" : d === "|" ? "a vertical bar" : `“${d}”`);

/** Fields of one line, splitting on `delimiter` outside double quotes (enough for sniffing). */
function splitLine(line: string, delimiter: string): number {
  let fields = 1;
  let quoted = false;
  for (let k = 0; k < line.length; k++) {
    const c = line[k];
    if (c === '"') quoted = !quoted;
    else if (!quoted && c === delimiter) fields++;
  }
  return fields;
}

/**
 * The delimiter that splits the first lines into the same number (> 1) of
 * fields most consistently; a comma when nothing splits.
 */
export function sniffDelimiter(text: string): string {
  const lines = text.replace(/^\uFEFF/, "").split(/\r?\n/).filter((l) => l.trim() !== "").slice(0, 20);
  let best = ",";
  let bestScore = 0;
  for (const d of DELIMITER_CANDIDATES) {
    const counts = lines.map((l) => splitLine(l, d));
    const first = counts[0] ?? 1;
    if (first < 2) continue;
    const agree = counts.filter((c) => c === first).length;
    const score = agree * 100 + first;
    if (score > bestScore) {
      bestScore = score;
      best = d;
    }
  }
  return best;
}

/** Decimal comma when the delimiter is not a comma and numbers such as 1,5 appear. */
export function sniffDecimalComma(text: string, delimiter: string): boolean {
  if (delimiter === ",") return false;
  const sample = text.slice(0, 20_000);
  const esc = delimiter === "|" ? "\\|" : delimiter === "\t" ? "\\t" : delimiter;
  const comma = new RegExp(`(^|${esc})\\s*-?\\d+,\\d+\\s*(?=${esc}|$)`, "m").test(sample);
  const point = new RegExp(`(^|${esc})\\s*-?\\d+\\.\\d+\\s*(?=${esc}|$)`, "m").test(sample);
  return comma && !point;
}

/** A number written in the file, or null when the text is not one. */
export function parseNumber(raw: string, decimalComma: boolean): number | null {
  let s = raw.trim();
  if (s === "") return null;
  if (decimalComma) {
    if (s.includes(".")) return null;
    s = s.replace(",", ".");
  }
  if (!/^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(s)) return null;
  const v = Number(s);
  return Number.isFinite(v) ? v : null;
}

const DAYS_BEFORE_MONTH = [0, 31, 59, 90, 120, 151, 181, 212, 243, 273, 304, 334];
const isLeap = (y: number) => (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;

/** A census time in years: a whole year (2014) or an ISO date (2014-05-20 → 2014 + day/365). */
export function parseCensusTime(raw: string): number | null {
  const s = raw.trim();
  if (/^\d{4}$/.test(s)) return Number(s);
  const m = /^(\d{4})-(\d{2})-(\d{2})$/.exec(s);
  if (!m) return null;
  const y = Number(m[1]);
  const mo = Number(m[2]);
  const d = Number(m[3]);
  const monthDays = [31, isLeap(y) ? 29 : 28, 31, 30, 31, 30, 31, 31, 30, 31, 30, 31][mo - 1];
  if (!monthDays || d < 1 || d > monthDays) return null;
  const dayOfYear = DAYS_BEFORE_MONTH[mo - 1]! + (mo > 2 && isLeap(y) ? 1 : 0) + d - 1;
  return y + dayOfYear / (isLeap(y) ? 366 : 365);
}

// ------------------------------------------------------------- header checks

/** Index of each mapped column in the header; problems for missing and duplicated ones. */
export function resolveColumns(header: readonly string[], wanted: Record<string, string | undefined>, labels: Record<string, string>): { index: Record<string, number>; problems: RecordProblem[] } {
  const problems: RecordProblem[] = [];
  const index: Record<string, number> = {};
  const names = header.map((h) => h.trim());
  const usedBy = new Map<string, string>();
  for (const [role, column] of Object.entries(wanted)) {
    if (column === undefined) continue;
    const label = labels[role] ?? role;
    const hits = names.flatMap((h, k) => (h === column ? [k] : []));
    if (hits.length === 0) {
      problems.push({ line: 1, column, problem: `The ${label} column “${column}” is not in the header (columns: ${names.map((n) => `“${n}”`).join(", ")}).` });
      continue;
    }
    if (hits.length > 1) {
      problems.push({ line: 1, column, problem: `The header has ${hits.length} columns named “${column}” (the ${label} column): rename one so the choice is unambiguous.` });
      continue;
    }
    const other = usedBy.get(column);
    if (other) {
      problems.push({ line: 1, column, problem: `The column “${column}” is chosen both as ${other} and as ${label}; each needs its own column.` });
      continue;
    }
    usedBy.set(column, label);
    index[role] = hits[0]!;
  }
  return { index, problems };
}

/** When the header is one field that contains another delimiter, the chosen delimiter is wrong. */
export function wrongDelimiterProblem(header: readonly string[], delimiter: string): RecordProblem | null {
  if (header.length !== 1) return null;
  const only = header[0] ?? "";
  const other = DELIMITER_CANDIDATES.find((d) => d !== delimiter && only.includes(d));
  if (!other) return null;
  return {
    line: 1,
    column: null,
    problem: `The header reads as a single column “${only.slice(0, 80)}”: the file seems to be separated by ${delimiterName(other)}, not ${delimiterName(delimiter)}. Choose ${delimiterName(other)} as the delimiter.`,
  };
}

// ------------------------------------------------------------ census counts

export interface CountsColumns {
  /** Row order as in the file. */
  time: number[];
  label: string[];
  count: number[];
  site: string[];
  /** Per-stage counts (NaN when blank), one array per mapped stage. */
  stageCounts: number[][];
  line: number[];
}

export class CountsChecker {
  readonly problems: RecordProblem[] = [];
  readonly out: CountsColumns;
  private readonly lastBySite = new Map<string, { t: number; label: string; line: number }>();

  constructor(
    private readonly header: readonly string[],
    private readonly index: { time: number; count: number; site?: number; stages: { stage: string; index: number }[] },
    private readonly decimalComma: boolean,
  ) {
    this.out = { time: [], label: [], count: [], site: [], stageCounts: index.stages.map(() => []), line: [] };
  }

  private col(k: number) {
    return this.header[k] ?? `column ${k + 1}`;
  }

  row(values: readonly string[], line: number): void {
    const bad = (k: number | null, problem: string) => this.problems.push({ line, column: k === null ? null : this.col(k), problem });
    if (values.length !== this.header.length) {
      bad(null, `This line has ${values.length} value${values.length === 1 ? "" : "s"}; the header has ${this.header.length}.`);
      return;
    }
    const rawTime = values[this.index.time]!;
    const t = parseCensusTime(rawTime);
    if (t === null) bad(this.index.time, rawTime.trim() === "" ? "The year is missing." : `“${rawTime}” is not a year (e.g. 2014) or a date (e.g. 2014-05-20).`);
    const rawCount = values[this.index.count]!;
    const n = parseNumber(rawCount, this.decimalComma);
    if (n === null) bad(this.index.count, rawCount.trim() === "" ? "The count is missing." : `“${rawCount}” is not a number.`);
    else if (n < 0) bad(this.index.count, `A count cannot be negative (${rawCount.trim()}).`);
    const site = this.index.site !== undefined ? values[this.index.site]!.trim() : "";
    if (this.index.site !== undefined && site === "") bad(this.index.site, "The site is missing.");
    const stageValues: number[] = [];
    for (const s of this.index.stages) {
      const raw = values[s.index]!;
      if (raw.trim() === "") {
        stageValues.push(NaN);
        continue;
      }
      const v = parseNumber(raw, this.decimalComma);
      if (v === null) bad(s.index, `“${raw}” is not a number.`);
      else if (v < 0) bad(s.index, `A count cannot be negative (${raw.trim()}).`);
      stageValues.push(v ?? NaN);
    }
    if (t !== null) {
      const prev = this.lastBySite.get(site);
      const where = site ? ` at ${site}` : "";
      if (prev && t === prev.t) bad(this.index.time, `${rawTime.trim()} is repeated${where} (also on line ${prev.line}).`);
      else if (prev && t < prev.t) bad(this.index.time, `${rawTime.trim()} comes after ${prev.label} (line ${prev.line})${where}: censuses must be in time order.`);
      if (!prev || t > prev.t) this.lastBySite.set(site, { t, label: rawTime.trim(), line });
    }
    this.out.time.push(t ?? NaN);
    this.out.label.push(rawTime.trim());
    this.out.count.push(n ?? NaN);
    this.out.site.push(site);
    stageValues.forEach((v, k) => this.out.stageCounts[k]!.push(v));
    this.out.line.push(line);
  }
}

// ------------------------------------------------------------- stage fates

export interface FateColumns {
  stages: string[];
  individual: string[];
  year: number[];
  stage: Int32Array;
  fate: Int32Array;
  offspring: Float64Array;
  site: string[];
  line: number[];
}

export class FatesChecker {
  readonly problems: RecordProblem[] = [];
  private readonly individual: string[] = [];
  private readonly year: number[] = [];
  private readonly stageText: string[] = [];
  private readonly fateText: (string | null)[] = [];
  private readonly offspring: number[] = [];
  private readonly site: string[] = [];
  private readonly line: number[] = [];
  /** (site, individual, year) → row index. */
  private readonly seen = new Map<string, number>();
  private readonly fixedStages: Map<string, number> | null;
  private readonly stageOrder: string[] = [];
  private readonly stageSeen = new Set<string>();
  private readonly dead: string;

  constructor(
    private readonly header: readonly string[],
    private readonly index: { individual: number; year: number; stage: number; fate: number; offspring?: number; site?: number },
    private readonly decimalComma: boolean,
    options: { deadValue: string; stages?: readonly string[] },
  ) {
    this.dead = options.deadValue.trim().toLowerCase();
    this.fixedStages = options.stages ? new Map(options.stages.map((s, k) => [s, k])) : null;
  }

  private col(k: number) {
    return this.header[k] ?? `column ${k + 1}`;
  }

  row(values: readonly string[], line: number): void {
    const bad = (k: number | null, problem: string) => this.problems.push({ line, column: k === null ? null : this.col(k), problem });
    if (values.length !== this.header.length) {
      bad(null, `This line has ${values.length} value${values.length === 1 ? "" : "s"}; the header has ${this.header.length}.`);
      return;
    }
    const id = values[this.index.individual]!.trim();
    if (id === "") bad(this.index.individual, "The individual id is missing.");
    const rawYear = values[this.index.year]!;
    const year = parseCensusTime(rawYear);
    if (year === null) bad(this.index.year, rawYear.trim() === "" ? "The year is missing." : `“${rawYear}” is not a year (e.g. 2014).`);
    const stage = values[this.index.stage]!.trim();
    if (stage === "") bad(this.index.stage, "The stage is missing.");
    else if (this.fixedStages && !this.fixedStages.has(stage)) {
      bad(this.index.stage, `“${stage}” is not one of the stages (${[...this.fixedStages.keys()].join(", ")}).`);
    } else if (!this.stageSeen.has(stage)) {
      this.stageSeen.add(stage);
      this.stageOrder.push(stage);
    }
    const fateRaw = values[this.index.fate]!.trim();
    const fate = fateRaw === "" ? null : fateRaw;
    if (fate !== null && fate.toLowerCase() !== this.dead && this.fixedStages && !this.fixedStages.has(fate)) {
      bad(this.index.fate, `The fate “${fate}” is neither a stage (${[...this.fixedStages.keys()].join(", ")}) nor “${this.dead}”.`);
    }
    let off = NaN;
    if (this.index.offspring !== undefined) {
      const raw = values[this.index.offspring]!;
      if (raw.trim() !== "") {
        const v = parseNumber(raw, this.decimalComma);
        if (v === null) bad(this.index.offspring, `“${raw}” is not a number.`);
        else if (v < 0) bad(this.index.offspring, `The number of offspring cannot be negative (${raw.trim()}).`);
        else off = v;
      }
    }
    const site = this.index.site !== undefined ? values[this.index.site]!.trim() : "";
    if (this.index.site !== undefined && site === "") bad(this.index.site, "The site is missing.");
    if (id !== "" && year !== null) {
      const key = `${site}\u0000${id}\u0000${year}`;
      const other = this.seen.get(key);
      if (other !== undefined) bad(this.index.individual, `Individual “${id}” appears twice in ${rawYear.trim()}${site ? ` at ${site}` : ""} (also on line ${this.line[other]}).`);
      else this.seen.set(key, this.individual.length);
    }
    this.individual.push(id);
    this.year.push(year ?? NaN);
    this.stageText.push(stage);
    this.fateText.push(fate);
    this.offspring.push(off);
    this.site.push(site);
    this.line.push(line);
  }

  /** Checks that need every row (fates naming stages never seen, fates that contradict the next census) and builds the columns. */
  finish(): FateColumns {
    const stages = this.fixedStages ? [...this.fixedStages.keys()] : this.stageOrder;
    const stageIndex = new Map(stages.map((s, k) => [s, k]));
    const m = this.individual.length;
    const stage = new Int32Array(m);
    const fate = new Int32Array(m);
    const fateColumn = this.col(this.index.fate);
    let reported = 0;
    for (let r = 0; r < m; r++) {
      stage[r] = stageIndex.get(this.stageText[r]!) ?? 0;
      const f = this.fateText[r]!;
      if (f === null) fate[r] = FATE_UNKNOWN;
      else if (f.toLowerCase() === this.dead) fate[r] = FATE_DEAD;
      else {
        const k = stageIndex.get(f);
        if (k === undefined) {
          if (!this.fixedStages && reported++ < 1000) {
            this.problems.push({ line: this.line[r]!, column: fateColumn, problem: `The fate “${f}” is neither a stage seen in the stage column (${stages.join(", ")}) nor “${this.dead}”.` });
          }
          fate[r] = FATE_UNKNOWN;
        } else fate[r] = k;
      }
    }
    // A fate that disagrees with the same individual's stage one year later.
    for (let r = 0; r < m; r++) {
      if (fate[r]! < 0 || !Number.isInteger(this.year[r]!)) continue;
      const nr = this.seen.get(`${this.site[r]}\u0000${this.individual[r]}\u0000${this.year[r]! + 1}`);
      if (nr !== undefined && this.stageText[nr] !== stages[fate[r]!]) {
        this.problems.push({ line: this.line[r]!, column: fateColumn, problem: `The fate says “${stages[fate[r]!]}”, but line ${this.line[nr]} has individual “${this.individual[r]}” as “${this.stageText[nr]}” in ${this.year[r]! + 1}.` });
      }
    }
    for (let r = 0; r < m; r++) {
      if (fate[r] !== FATE_DEAD || !Number.isInteger(this.year[r]!)) continue;
      const nr = this.seen.get(`${this.site[r]}\u0000${this.individual[r]}\u0000${this.year[r]! + 1}`);
      if (nr !== undefined) this.problems.push({ line: this.line[r]!, column: fateColumn, problem: `Individual “${this.individual[r]}” is recorded dead, but line ${this.line[nr]} finds it alive in ${this.year[r]! + 1}.` });
    }
    return { stages, individual: this.individual, year: this.year, stage, fate, offspring: Float64Array.from(this.offspring), site: this.site, line: this.line };
  }
}
