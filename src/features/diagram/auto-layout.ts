/**
 * Automatic layout with dagre: stages in layers from left to right in the
 * order of development. Growth arrows set the order; shrinkage arrows count
 * backwards (they undo growth); reproduction arrows and loops are left out,
 * since they run against development by nature.
 */
import dagre from "@dagrejs/dagre";
import type { LifeCycle } from "../../../shared/lifecycle";
import { DEFAULT_STAGE_SIZE } from "./geometry";

export interface Size {
  width: number;
  height: number;
}

/** Top-left positions for every stage; sizes default to DEFAULT_STAGE_SIZE where not measured yet. */
export function layoutStages(document: LifeCycle, sizes: ReadonlyMap<string, Size>): Map<string, { x: number; y: number }> {
  const g = new dagre.graphlib.Graph({ multigraph: false });
  // Extra room between layers and rows for loops above and below and for arrow labels.
  g.setGraph({ rankdir: "LR", nodesep: 110, ranksep: 96, marginx: 40, marginy: 80 });
  g.setDefaultEdgeLabel(() => ({}));
  for (const s of document.stages) {
    const size = sizes.get(s.id) ?? DEFAULT_STAGE_SIZE;
    g.setNode(s.id, { width: size.width, height: size.height });
  }
  for (const t of document.transitions) {
    if (t.from === t.to || t.kind === "reproduction") continue;
    const [from, to] = t.kind === "shrinkage" ? [t.to, t.from] : [t.from, t.to];
    if (!g.hasEdge(from, to)) g.setEdge(from, to, { weight: t.kind === "growth" ? 2 : 1, minlen: 1 });
  }
  dagre.layout(g);
  const positions = new Map<string, { x: number; y: number }>();
  for (const s of document.stages) {
    const node = g.node(s.id);
    const size = sizes.get(s.id) ?? DEFAULT_STAGE_SIZE;
    // dagre gives centres; the document keeps top-left corners.
    if (node) positions.set(s.id, { x: Math.round(node.x - size.width / 2), y: Math.round(node.y - size.height / 2) });
  }
  return positions;
}
