import type { Edge, Node } from "@xyflow/react";
import type { TransitionKind } from "../../../shared/lifecycle";
import type { Lane } from "./geometry";
import type { StaleReason } from "./readouts";

/** What a stage shows after analysis. */
export interface StageReadout {
  /** Share of the stable stage distribution w (0–1). */
  share: number | null;
  /** Reproductive value v (scaled as the analysis says). */
  value: number | null;
  /** The numbers describe an earlier version of the document. */
  stale: boolean;
  /** Why, when stale. */
  staleReason: StaleReason;
}

export type StageNodeData = {
  name: string;
  color: string | undefined;
  readout: StageReadout | null;
  readOnly: boolean;
  /** Open review threads anchored to this stage. */
  comments: number;
};
export type StageNode = Node<StageNodeData, "stage">;

export type TransitionEdgeData = {
  kind: TransitionKind;
  /** The rate as shown on the arrow (value or formula, shortened). */
  label: string;
  lane: Lane;
  /** 0–1 relative to the largest elasticity, when arrows are shaded by elasticity. */
  shade: number | null;
  /** The arrow's elasticity as text, when shaded. */
  elasticityText: string | null;
  /** The arrow's rate cannot be computed (see the inspector). */
  problem: boolean;
  /** Open review threads anchored to this arrow. */
  comments: number;
};
export type TransitionEdge = Edge<TransitionEdgeData, "transition">;
