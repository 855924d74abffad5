/** Sentences the report page and the PDF both print, so they read the same. */
import { formatLambda, formatNumber, formatPercent } from "../format/number-format";
import type { LifeCycle } from "../lifecycle";
import type { LifeCycleAnalysis } from "../schemas/life-cycles";
import type { LifeCycleReport, ReportClimate, ReportLevers, ReportReview, ReportWarming } from "./model";

/** "2026-12-02 01:30 UTC" */
export function dateText(iso: string): string {
  return `${iso.slice(0, 10)} ${iso.slice(11, 16)} UTC`;
}

/** Which state of the life cycle the report shows: a snapshot, or the saved state and how it relates to the newest snapshot. */
export function describeSource(r: LifeCycleReport): string {
  const s = r.source;
  if (s.kind === "snapshot") return `Snapshot #${s.number} (${s.id}) of ${dateText(s.createdAt)}${s.authorName ? ` by ${s.authorName}` : ""}: “${s.message}”`;
  const snap = s.latestSnapshot;
  const snapText = snap
    ? snap.sameAsNow
      ? `identical to snapshot #${snap.number} (${snap.id}) of ${dateText(snap.createdAt)}`
      : `changed since snapshot #${snap.number} (${snap.id}) of ${dateText(snap.createdAt)}`
    : "no snapshot taken yet";
  return `Saved state, version ${s.version} of ${dateText(s.savedAt)}; ${snapText}`;
}

/** A vital rate's uncertainty as given: its CI, else its SE, else "—". */
export function uncertaintyText(rate: LifeCycle["rates"][number]): string {
  if (rate.ci) return `${Math.round(rate.ci.level * 100)} % CI ${formatNumber(rate.ci.lower)} – ${formatNumber(rate.ci.upper)}`;
  if (rate.se !== undefined) return `SE ${formatNumber(rate.se)}`;
  return "—";
}

/** P as a percentage, with "< 0.1 %" and "> 99.9 %" at the ends. */
function chance(p: number): string {
  if (p < 0.001) return "< 0.1 %";
  if (p > 0.999) return "> 99.9 %";
  return formatPercent(p);
}

/** λ's interval from the rates' uncertainty (delta method), or null when the rates carry none. */
export function lambdaIntervalText(analysis: LifeCycleAnalysis | null): string | null {
  const u = analysis?.uncertainty;
  if (!u?.lambda) return null;
  return `${formatNumber(u.level * 100, 3)} % interval ${formatLambda(u.lambda.lower)} – ${formatLambda(u.lambda.upper)} from the rates' uncertainty (delta method); P(λ < 1) = ${chance(u.lambda.probabilityBelowOne)}.`;
}

/** λ's percentile interval from the newest Monte Carlo Run, or null without one. */
export function lambdaRunText(r: LifeCycleReport): string | null {
  const m = r.lambdaRun;
  if (!m) return null;
  const when = m.finishedAt ? `, ${dateText(m.finishedAt)}` : "";
  const state = m.sameAsReported ? "" : ` It drew from version ${m.lifeCycleVersion} of the life cycle, not the state reported here.`;
  return `Monte Carlo Run (${m.runId}${when}): ${m.draws.toLocaleString("en")} draws from the rates' uncertainty give a ${formatNumber(m.level * 100, 3)} % percentile interval ${formatLambda(m.lower)} – ${formatLambda(m.upper)} (median ${formatLambda(m.median)}); P(λ < 1) = ${chance(m.probabilityBelowOne)}.${state}`;
}

const signed = (x: number | null, digits = 4) => (x === null ? "—" : `${x >= 0 ? "+" : "−"}${Math.abs(x).toFixed(digits)}`);

/** The scenario table: one row per scenario (the baseline first). */
export function scenarioRows(levers: ReportLevers): { header: string[]; rows: string[][] } {
  const rows = (levers.comparison?.rows ?? []).map((r) => [
    r.name,
    r.action ?? "—",
    r.cost === null ? "—" : formatNumber(r.cost),
    r.planned ? formatLambda(r.planned.lambda) : "—",
    r.scenarioId === null ? "—" : signed(r.planned?.deltaLambda ?? null),
    r.deltaLambdaPerCost === null ? "—" : formatNumber(r.deltaLambdaPerCost, 3),
    r.problem ? r.problem.message : r.planned && !r.planned.isSound ? `Check the model: ${r.planned.warnings[0] ?? "it fails a check"}` : r.achievable ? `At the achievable changes λ = ${formatLambda(r.achievable.lambda)}` : "",
  ]);
  return { header: ["Scenario", "Action", "Cost", "λ", "Δλ", "Δλ per unit cost", "Notes"], rows };
}

/** The strongest levers: Δλ when each is raised or lowered by the same share. */
export function leverRows(levers: ReportLevers): { header: string[]; rows: string[][] } {
  const pct = `${Math.round(levers.relativeChange * 100)} %`;
  return {
    header: ["Lever", "Value", "Elasticity", `Δλ if ${pct} higher`, `Δλ if ${pct} lower`],
    rows: levers.topLevers.map((l) => [l.label, formatNumber(l.value), formatNumber(l.elasticity, 3), signed(l.deltaUp), signed(l.deltaDown)]),
  };
}

const STATE_TEXT: Record<ReportReview["status"]["state"], string> = {
  none: "Not reviewed yet.",
  requested: "Review requested; waiting for decisions.",
  approved: "Approved.",
  changes_requested: "Changes requested.",
};

/** One sentence on where the review stands. */
export function reviewStatusText(review: ReportReview): string {
  const s = review.status;
  if (s.state === "none") return STATE_TEXT.none;
  const counts = `${s.approvals} approval${s.approvals === 1 ? "" : "s"}, ${s.changeRequests} request${s.changeRequests === 1 ? "" : "s"} for changes, ${s.pending} pending`;
  const changed = s.changedSinceApproval ? " The model has changed since the approved snapshot: this report may show an unreviewed state." : "";
  return `${STATE_TEXT[s.state]} Snapshot #${s.snapshotNumber}: ${counts}.${changed}`;
}

/** Reviews, newest first: reviewer, snapshot, decision, date, summary. */
export function reviewRows(review: ReportReview): { header: string[]; rows: string[][] } {
  const decision = { requested: "pending", approved: "approved", changes_requested: "changes requested" } as const;
  return {
    header: ["Reviewer", "Snapshot", "Decision", "Date", "Summary"],
    rows: review.reviews.map((r) => [r.reviewerName, `#${r.snapshotNumber}`, decision[r.state], (r.decidedAt ?? r.createdAt).slice(0, 10), r.summary || r.message || "—"]),
  };
}

/** °C as the Climate tab writes it: 4 significant digits. */
export const celsiusText = (t: number): string => `${formatNumber(t, 4)} °C`;

const signedNumber = (x: number, digits = 3) => `${x < 0 ? "−" : x > 0 ? "+" : ""}${formatNumber(Math.abs(x), digits)}`;

/** The persistence window as the Climate tab writes it: "5.637 °C – 16.92 °C", an open end as "below …" / "above …". */
export function windowText(c: ReportClimate): string {
  if (c.window.length === 0) return "none in this range";
  return c.window.map((w) => `${w.lower !== null ? celsiusText(w.lower) : `below ${celsiusText(w.from)}`} – ${w.upper !== null ? celsiusText(w.upper) : `above ${celsiusText(w.to)}`}`).join("; ");
}

const BASIS_MARK = { typical: "typical value", convention: "round reference", illustrative: "illustrative default" } as const;

/** The thermal responses: rate, form, parameters (defaults marked), the response's own optimum and the rate's source note. */
export function thermalResponseRows(c: ReportClimate): { header: string[]; rows: string[][] } {
  return {
    header: ["Rate", "Response", "Parameters", "Its own optimum", "Source of the rate"],
    rows: c.responses.map((r) => [
      r.rateName,
      `${r.formLabel}${r.appliesTo === "hazard" ? ", on the hazard: survival = exp(−h)" : ""}`,
      r.parameters.map((p) => `${p.label} = ${formatNumber(p.value, 4)}${p.unit ? ` ${p.unit}` : ""}${p.basis ? ` (${BASIS_MARK[p.basis]})` : ""}`).join("; "),
      r.optimum === null ? (r.form === "arrhenius" ? "none (keeps rising)" : "—") : celsiusText(r.optimum),
      r.rateSource ?? "none given",
    ]),
  };
}

/** The formulas used, once per form, and where each default value comes from. */
export function thermalNotes(c: ReportClimate): string[] {
  const formulas = [...new Map(c.responses.map((r) => [r.form, `${r.formLabel}: ${r.formula}.`])).values()];
  const defaults = [...new Set(c.responses.flatMap((r) => r.parameters.flatMap((p) => (p.note ? [`${p.label}: ${p.note}`] : []))))];
  return [...formulas, ...defaults];
}

const SLOPE_BASIS = {
  trajectory: "the first year of the warming trajectory",
  reference: "the reference temperature of the responses",
  window: "the middle of the persistence window",
  range: "the middle of the range",
} as const;

/** What λ(T) says: the range, the window and its edges, the optimum, the slope at the reference temperature, clamped rates. */
export function climateFindings(c: ReportClimate, headlineLambda: number | null, timeStepUnit: string): string[] {
  const lines = [
    `${c.responses.length} vital rate${c.responses.length === 1 ? "" : "s"} respond${c.responses.length === 1 ? "s" : ""} to temperature (${c.responses.map((r) => r.rateName).join(", ")}). λ(T) is computed from ${celsiusText(c.range.min)} to ${celsiusText(c.range.max)} (${c.range.saved ? "the range saved on the Climate tab" : "the Climate tab's default range"}); the other rates keep their values.`,
  ];
  if (c.problem) return [...lines, c.problem];
  if (c.window.length === 0) lines.push(`Persistence window (λ ≥ 1): none in this range. λ stays below 1 from ${celsiusText(c.range.min)} to ${celsiusText(c.range.max)}.`);
  else {
    const edged = c.window.some((w) => w.lower !== null || w.upper !== null);
    lines.push(`Persistence window (λ ≥ 1): ${windowText(c)}.${edged ? " Its edges are found by root-finding and hold λ = 1 to within 10⁻⁹." : ""}`);
    if (c.window.some((w) => w.lower === null || w.upper === null)) lines.push("The window runs past the end of the range; widen the range on the Climate tab to find that edge.");
  }
  if (c.optimum) lines.push(`Highest λ in the range: ${formatLambda(c.optimum.lambda)} at ${celsiusText(c.optimum.temperature)}${c.optimum.atBoundary ? ", at the end of the range: λ may rise further outside it" : ""}.`);
  const s = c.slope;
  if (s) {
    lines.push(
      `At ${celsiusText(s.temperature)} (${SLOPE_BASIS[s.basis]}) λ = ${formatLambda(s.lambda)} per ${timeStepUnit} and dλ/dT = ${signedNumber(s.slope)} per °C (${signedNumber((100 * s.slope) / s.lambda, 2)} % of λ per °C).`,
    );
    if (headlineLambda !== null && Math.abs(headlineLambda - s.lambda) >= 5e-5) {
      lines.push(`The headline λ (${formatLambda(headlineLambda)}) uses each rate's own value; λ(T) uses the responses, which at ${celsiusText(s.temperature)} do not give exactly those values.`);
    }
  }
  for (const k of c.clamped) lines.push(`${k.name} is a probability, but its response exceeds 1 from ${celsiusText(k.from)} to ${celsiusText(k.to)} (up to ${formatNumber(k.worst, 3)}); there it is held at 1.`);
  return lines;
}

/** dλ/dT split by rate: (∂λ/∂x)(dx/dT). */
export function slopeRows(c: ReportClimate): { header: string[]; rows: string[][] } | null {
  if (!c.slope || c.slope.contributions.length === 0) return null;
  return {
    header: ["Rate", "Value", "d rate / dT (per °C)", "∂λ/∂rate", "Part of dλ/dT (per °C)"],
    rows: c.slope.contributions.map((k) => [k.name, formatNumber(k.value, 4), signedNumber(k.rateSlope), formatNumber(k.sensitivity, 3), signedNumber(k.contribution)]),
  };
}

/** The warming Run in sentences: what was run, the first year with λ_t < 1, how often and how soon in the replicates, quasi-extinction. */
export function warmingLines(w: ReportWarming): string[] {
  const after = w.lastYear + 1;
  const lines = [
    `Newest finished warming Run (${w.runId}${w.finishedAt ? `, ${dateText(w.finishedAt)}` : ""}): ${w.replicates.toLocaleString("en")} replicates of ${w.trajectory}; seed ${w.seed}${w.initialTotal !== null ? `; ${formatNumber(w.initialTotal)} individuals at the start, in the stable stage structure of the first year` : ""}.`,
    w.firstYearBelowOne !== null
      ? `Without year-to-year noise, λ_t first falls below 1 in ${w.firstYearBelowOne}.`
      : `Without year-to-year noise, λ_t stays at or above 1 through ${w.lastYear}.`,
    `With year-to-year noise (SD ${formatNumber(w.sd, 3)} °C), λ_t falls below 1 at least once in ${formatPercent(w.shareEverBelowOne)} of the replicates${w.medianFirstYearBelowOne !== null ? `, by ${w.medianFirstYearBelowOne} in half of them` : ""}.`,
  ];
  if (w.threshold !== null && w.shareBelowThresholdAtEnd !== null) {
    lines.push(`Quasi-extinction: at the start of ${after}, ${formatPercent(w.shareBelowThresholdAtEnd)} of the replicates are below ${formatNumber(w.threshold)} individuals.`);
  } else lines.push("No quasi-extinction threshold was set for this Run.");
  lines.push(`Population at the start of ${after}: median ${formatNumber(w.finalMedian, 3)} (5–95 % of the replicates ${formatNumber(w.finalLow, 3)} – ${formatNumber(w.finalHigh, 3)}); ${formatNumber(w.finalDeterministic, 3)} without noise.`);
  return lines;
}
