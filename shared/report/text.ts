/** Sentences the report page and the PDF both print, so they read the same. */
import { formatNumber } from "../format/number-format";
import type { LifeCycle } from "../lifecycle";
import type { LifeCycleReport } from "./model";

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
