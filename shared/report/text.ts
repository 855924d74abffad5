/** Sentences the report page and the PDF both print, so they read the same. */
import { formatLambda, formatNumber, formatPercent } from "../format/number-format";
import type { LifeCycle } from "../lifecycle";
import type { LifeCycleAnalysis } from "../schemas/life-cycles";
import type { LifeCycleReport, ReportLevers, ReportReview } from "./model";

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
