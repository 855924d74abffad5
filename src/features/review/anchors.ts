import type { LifeCycle } from "../../../shared/lifecycle";
import type { CommentAnchor, CommentThread } from "../../../shared/schemas/review";
import { type Selection, selectionKey } from "../../lib/editor-types";

/** The editor selection an anchor points at (snapshots and the whole life cycle have none). */
export function anchorSelection(anchor: CommentAnchor): Selection | null {
  switch (anchor.kind) {
    case "stage":
    case "transition":
    case "rate":
      return { kind: anchor.kind, id: anchor.id };
    case "cell":
      return { kind: "cell", to: anchor.to, from: anchor.from };
    default:
      return null;
  }
}

/** The comment anchor for an editor selection. */
export function selectionAnchor(selection: Selection): CommentAnchor {
  return selection.kind === "cell" ? { kind: "cell", to: selection.to, from: selection.from } : { kind: selection.kind, id: selection.id };
}

const stageName = (doc: LifeCycle, id: string) => doc.stages.find((s) => s.id === id)?.name;

/** How a selection reads in the current document, or null when it no longer exists. */
export function describeSelection(doc: LifeCycle, selection: Selection): string | null {
  switch (selection.kind) {
    case "stage": {
      const name = stageName(doc, selection.id);
      return name === undefined ? null : `stage ${name}`;
    }
    case "transition": {
      const t = doc.transitions.find((x) => x.id === selection.id);
      if (!t) return null;
      return t.from === t.to ? `arrow ${stageName(doc, t.from)} ↺ (${t.kind})` : `arrow ${stageName(doc, t.from)} → ${stageName(doc, t.to)} (${t.kind})`;
    }
    case "rate": {
      const r = doc.rates.find((x) => x.id === selection.id);
      return r ? `vital rate ${r.name}` : null;
    }
    case "cell": {
      const from = stageName(doc, selection.from);
      const to = stageName(doc, selection.to);
      return from === undefined || to === undefined ? null : `matrix entry from ${from} to ${to}`;
    }
  }
}

/** Open threads per anchor (keyed by `selectionKey`), for the markers on the Diagram and the Matrix. */
export function openThreadCounts(threads: readonly CommentThread[]): Map<string, number> {
  const counts = new Map<string, number>();
  for (const t of threads) {
    if (t.resolvedAt) continue;
    const sel = anchorSelection(t.anchor);
    if (!sel) continue;
    const key = selectionKey(sel);
    counts.set(key, (counts.get(key) ?? 0) + 1);
  }
  return counts;
}

/** People named as `@Full Name` in a text (members only), for the notifications. */
export function findMentions(text: string, members: readonly { userId: string; name: string }[]): string[] {
  const lower = text.toLowerCase();
  return members.filter((m) => lower.includes(`@${m.name.toLowerCase()}`)).map((m) => m.userId);
}
