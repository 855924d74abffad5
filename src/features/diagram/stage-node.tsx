import { Handle, type NodeProps, Position, useConnection } from "@xyflow/react";
import { memo } from "react";
import type { StageNode } from "./diagram-types";
import { STALE_SHORT, formatShare, formatValue } from "./readouts";
import { DEFAULT_STAGE_COLOR } from "./palette";

/**
 * One stage on the canvas. The small knob on the right starts an arrow; while
 * an arrow is being drawn the whole stage is its target, so dropping on a
 * stage (this one too, for a loop) connects.
 */
function StageNodeView({ data, selected }: NodeProps<StageNode>) {
  const connecting = useConnection((connection) => connection.inProgress);
  const { readout } = data;
  return (
    <div
      className={`sw-stage ${selected ? "sw-stage--selected" : ""}`}
      style={{ borderLeftColor: data.color ?? DEFAULT_STAGE_COLOR }}
      data-stage-name={data.name}
    >
      <Handle
        type="target"
        position={Position.Left}
        isConnectableStart={false}
        className="sw-stage-target"
        style={{ pointerEvents: connecting ? "all" : "none" }}
      />
      <div className="sw-stage-name">{data.name}</div>
      {data.comments > 0 && (
        <span className="sw-comment-marker sw-comment-marker--stage" title={`${data.comments} open review ${data.comments === 1 ? "thread" : "threads"} (Review tab)`} data-comment-marker="">
          <span aria-hidden="true">✎ </span>
          {data.comments}
          <span className="sr-only"> open review {data.comments === 1 ? "thread" : "threads"}</span>
        </span>
      )}
      {readout && (
        <dl className={`sw-stage-readout ${readout.stale ? "sw-stage-readout--stale" : ""}`}>
          <div>
            <dt>Stable share</dt>
            <dd>{formatShare(readout.share)}</dd>
          </div>
          <div>
            <dt>Repr. value</dt>
            <dd>{formatValue(readout.value)}</dd>
          </div>
          {readout.stale && <div className="sw-stage-stale">{STALE_SHORT[readout.staleReason]}</div>}
        </dl>
      )}
      {/* Arrows need a source handle to attach to, so read-only stages keep an invisible one. */}
      {data.readOnly ? (
        <Handle type="source" position={Position.Right} className="sw-stage-anchor" isConnectable={false} />
      ) : (
        <Handle type="source" position={Position.Right} className="sw-stage-source" title="Drag to a stage to draw an arrow (back onto this stage for a loop)" />
      )}
    </div>
  );
}

export const StageNodeComponent = memo(StageNodeView);
