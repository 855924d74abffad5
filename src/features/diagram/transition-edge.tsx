import { BaseEdge, type EdgeProps, type InternalNode, useInternalNode } from "@xyflow/react";
import { memo } from "react";
import type { TransitionEdge } from "./diagram-types";
import { DEFAULT_STAGE_SIZE, type Rect, arrowGeometry } from "./geometry";
import { BRICK, CLAY, INDIGO, INK, REPRODUCTION_DASH, SPRUCE } from "./palette";

function rectOf(node: InternalNode): Rect {
  return {
    x: node.internals.positionAbsolute.x,
    y: node.internals.positionAbsolute.y,
    width: node.measured.width ?? DEFAULT_STAGE_SIZE.width,
    height: node.measured.height ?? DEFAULT_STAGE_SIZE.height,
  };
}

/** Stroke width of an arrow: plain, or from 1.5 to 9 by its share of the largest elasticity. */
export function strokeWidthFor(shade: number | null): number {
  return shade === null ? 2 : 1.5 + 7.5 * shade;
}

/**
 * One arrow. Survival arrows are solid spruce, reproduction arrows dashed
 * clay; the label is the rate (value or formula). The path runs between the
 * stages' edges, in its own lane when several arrows share two stages.
 */
function TransitionEdgeView({ id, source, target, data, selected, markerEnd }: EdgeProps<TransitionEdge>) {
  const from = useInternalNode(source);
  const to = useInternalNode(target);
  if (!from || !to || !data) return null;
  const { path, label } = arrowGeometry(rectOf(from), rectOf(to), data.lane);
  const reproduction = data.kind === "reproduction";
  const color = reproduction ? CLAY : SPRUCE;
  const width = strokeWidthFor(data.shade);
  const text = data.elasticityText ? `${data.label} · e ${data.elasticityText}` : data.label;
  return (
    <>
      {selected && <path d={path} fill="none" stroke={INDIGO} strokeOpacity={0.35} strokeWidth={width + 8} strokeLinecap="round" />}
      <BaseEdge
        id={id}
        path={path}
        markerEnd={markerEnd}
        interactionWidth={18}
        style={{
          stroke: color,
          strokeWidth: width,
          strokeDasharray: reproduction ? REPRODUCTION_DASH : undefined,
          opacity: data.shade === null ? 1 : 0.45 + 0.55 * data.shade,
        }}
        label={text}
        labelX={label.x}
        labelY={label.y}
        labelStyle={{ fill: data.problem ? BRICK : INK, fontSize: 12, fontWeight: 700 }}
        labelShowBg
        labelBgStyle={{ fill: "#ffffff", stroke: data.problem ? BRICK : color, strokeWidth: 1, strokeDasharray: reproduction ? "3 2" : undefined }}
        labelBgPadding={[5, 3]}
        labelBgBorderRadius={4}
      />
      {data.comments > 0 && (
        // A marker above the label: open review threads on this arrow.
        <g transform={`translate(${label.x}, ${label.y - 22})`} data-comment-marker="" className="sw-comment-marker-edge">
          <title>{`${data.comments} open review ${data.comments === 1 ? "thread" : "threads"} (Review tab)`}</title>
          <rect x={-17} y={-9} width={34} height={18} rx={9} fill={INDIGO} />
          <text x={0} y={4} textAnchor="middle" fill="#ffffff" fontSize={11} fontWeight={700}>
            {`✎ ${data.comments}`}
          </text>
        </g>
      )}
    </>
  );
}

export const TransitionEdgeComponent = memo(TransitionEdgeView);
