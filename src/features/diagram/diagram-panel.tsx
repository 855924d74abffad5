/**
 * The Diagram tab: stages as boxes, arrows between them, an inspector beside
 * the canvas. The document is the only state that matters: nodes and edges
 * are derived from it on every change, and every edit goes out through
 * `onChange` (so it can be undone and is autosaved). Only what the canvas
 * needs while a gesture runs (a stage being dragged, measured sizes) is kept
 * here.
 */
import "@xyflow/react/dist/style.css";
import "./diagram.css";
import {
  Background,
  Controls,
  type EdgeChange,
  type EdgeTypes,
  MarkerType,
  type NodeChange,
  type NodeTypes,
  ReactFlow,
  ReactFlowProvider,
  useReactFlow,
} from "@xyflow/react";
import { type KeyboardEvent, useCallback, useEffect, useMemo, useRef, useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import type { EditorPanelProps } from "../../lib/editor-types";
import { Button } from "../../components/ui/button";
import { layoutStages } from "./auto-layout";
import type { StageNode, StageReadout, TransitionEdge } from "./diagram-types";
import { KIND_LABELS, addStage, addTransition, arrowName, moveStages, removeElements, stageName } from "./document-edits";
import { diagramSvg, downloadBlob, fileSlug, svgToPng } from "./export-diagram";
import { DEFAULT_STAGE_SIZE, type Lane, type Rect, arrowLanes } from "./geometry";
import { CLAY, REPRODUCTION_DASH, SPRUCE } from "./palette";
import { rateLabel, rateToText } from "./rate-text";
import { STALE_LONG, formatElasticity, staleReason } from "./readouts";
import { INSPECTOR_FIRST_FIELD, StageInspector } from "./stage-inspector";
import { StageNodeComponent } from "./stage-node";
import { TransitionEdgeComponent } from "./transition-edge";
import { TransitionInspector } from "./transition-inspector";

// Defined once, outside any component, so React Flow never sees new types.
const nodeTypes: NodeTypes = { stage: StageNodeComponent };
const edgeTypes: EdgeTypes = { transition: TransitionEdgeComponent };

const markerFor = (color: string) => ({ type: MarkerType.ArrowClosed, color, width: 16, height: 16, markerUnits: "userSpaceOnUse" });
const survivalMarker = markerFor(SPRUCE);
const reproductionMarker = markerFor(CLAY);

type Size = { width: number; height: number };

/** Elasticities when arrows are not shaded by them: none, and always the same map. */
const NO_ELASTICITIES: ReadonlyMap<string, number> = new Map();

/** Two arrows that draw the same (React Flow re-renders an arrow only when its object changes). */
function sameEdge(a: TransitionEdge, b: TransitionEdge): boolean {
  const p = a.data!;
  const q = b.data!;
  return (
    a.source === b.source &&
    a.target === b.target &&
    a.selected === b.selected &&
    a.markerEnd === b.markerEnd &&
    a.ariaLabel === b.ariaLabel &&
    p.kind === q.kind &&
    p.label === q.label &&
    p.shade === q.shade &&
    p.elasticityText === q.elasticityText &&
    p.problem === q.problem &&
    p.comments === q.comments &&
    sameLane(p.lane, q.lane)
  );
}

function sameLane(a: Lane, b: Lane): boolean {
  if (a.loop !== null || b.loop !== null) return a.loop === b.loop;
  return a.offset === b.offset && a.scaleWithLength === b.scaleWithLength;
}

/** A stage click this soon after an arrow was drawn is the end of that drag, not a new selection. */
const CLICK_AFTER_CONNECT_MS = 300;

/** Per-arrow elasticity: the arrow's part of a_ij times ∂λ/∂a_ij over λ, so the parts of one cell add up to its elasticity. */
function arrowElasticities(document: LifeCycle, analysis: EditorPanelProps["analysis"]): Map<string, number> {
  const result = new Map<string, number>();
  const data = analysis.data;
  if (!data?.sensitivity || data.lambda <= 0) return result;
  const index = new Map(data.stageIds.map((id, i) => [id, i]));
  for (const t of document.transitions) {
    const i = index.get(t.to);
    const j = index.get(t.from);
    if (i === undefined || j === undefined) continue;
    const part = (t.kind === "reproduction" ? data.matrices.F : data.matrices.U)[i]?.[j];
    const s = data.sensitivity[i]?.[j];
    if (part === undefined || s === undefined) continue;
    result.set(t.id, (part * s) / data.lambda);
  }
  return result;
}

function DiagramEditor({ document, onChange, readOnly, analysis, selection, onSelect, commentCounts }: EditorPanelProps) {
  const flow = useReactFlow<StageNode, TransitionEdge>();
  const [sizes, setSizes] = useState<ReadonlyMap<string, Size>>(new Map());
  const [dragging, setDragging] = useState<ReadonlyMap<string, { x: number; y: number }>>(new Map());
  const [shadeByElasticity, setShadeByElasticity] = useState(false);
  const [notice, setNotice] = useState<string | null>(null);
  const [exportError, setExportError] = useState<string | null>(null);
  const canvasRef = useRef<HTMLDivElement>(null);
  const connectedAt = useRef(-Infinity);

  useEffect(() => {
    if (notice === null) return;
    const timer = window.setTimeout(() => setNotice(null), 6000);
    return () => window.clearTimeout(timer);
  }, [notice]);

  // ---------------------------------------------------------------- analysis
  const reason = staleReason(analysis);
  const readouts = useMemo(() => {
    const map = new Map<string, StageReadout>();
    const data = analysis.data;
    if (!data) return map;
    data.stageIds.forEach((id, i) => {
      map.set(id, { share: data.stableStage?.[i] ?? null, value: data.reproductiveValue?.[i] ?? null, stale: analysis.stale, staleReason: reason });
    });
    return map;
  }, [analysis.data, analysis.stale, reason]);

  const elasticities = useMemo(() => arrowElasticities(document, analysis), [document, analysis]);
  const maxElasticity = useMemo(() => {
    let max = 0;
    for (const e of elasticities.values()) if (e > max) max = e;
    return max;
  }, [elasticities]);
  const shading = shadeByElasticity && elasticities.size > 0 && maxElasticity > 0;
  // Unshaded arrows do not depend on the analysis, so a new result does not rebuild them.
  const arrowElasticity = shading ? elasticities : NO_ELASTICITIES;

  /** Arrows whose rate the server could not compute, by index in the document (fields `document.transitions.N.rate`). */
  const computeProblems = useMemo(() => {
    const map = new Map<string, string>();
    for (const field of analysis.error?.fields ?? []) {
      const match = /^document\.transitions\.(\d+)\.rate$/.exec(field.path);
      const t = match ? document.transitions[Number(match[1])] : undefined;
      if (t) map.set(t.id, field.message);
    }
    return map;
  }, [analysis.error, document.transitions]);

  // ------------------------------------------------------------ nodes, edges
  const nodes = useMemo<StageNode[]>(
    () =>
      document.stages.map((s) => ({
        id: s.id,
        type: "stage",
        position: dragging.get(s.id) ?? s.position,
        data: { name: s.name, color: s.color, readout: readouts.get(s.id) ?? null, readOnly, comments: commentCounts.get(`stage:${s.id}`) ?? 0 },
        ...(sizes.has(s.id) ? { measured: sizes.get(s.id) } : {}),
        selected: selection?.kind === "stage" && selection.id === s.id,
        ariaLabel: `Stage ${s.name}`,
      })),
    [document.stages, dragging, readouts, readOnly, sizes, selection, commentCounts],
  );

  const rects = useMemo(() => {
    const map = new Map<string, Rect>();
    for (const s of document.stages) {
      const size = sizes.get(s.id) ?? DEFAULT_STAGE_SIZE;
      const p = dragging.get(s.id) ?? s.position;
      map.set(s.id, { x: p.x, y: p.y, width: size.width, height: size.height });
    }
    return map;
  }, [document.stages, sizes, dragging]);

  const lanes = useMemo(() => arrowLanes(document.transitions, rects), [document.transitions, rects]);

  // An edit changes one or two arrows: the others keep their objects, so React Flow
  // re-draws only what changed (re-drawing all of them costs tens of ms at 150 arrows).
  const previousEdges = useRef<ReadonlyMap<string, TransitionEdge>>(new Map());
  const edges = useMemo<TransitionEdge[]>(() => {
    const reuse = new Map<string, TransitionEdge>();
    const list = document.transitions.map((t) => {
      const e = arrowElasticity.get(t.id);
      const edge: TransitionEdge = {
        id: t.id,
        source: t.from,
        target: t.to,
        type: "transition",
        selected: selection?.kind === "transition" && selection.id === t.id,
        markerEnd: t.kind === "reproduction" ? reproductionMarker : survivalMarker,
        ariaLabel: `${KIND_LABELS[t.kind]} arrow ${arrowName(document, t)}, rate ${rateToText(t.rate)}`,
        data: {
          kind: t.kind,
          label: rateLabel(t.rate),
          lane: lanes.get(t.id) ?? { loop: null, offset: 0, scaleWithLength: false },
          shade: e !== undefined ? e / maxElasticity : null,
          elasticityText: e !== undefined ? formatElasticity(e) : null,
          problem: computeProblems.has(t.id),
          comments: commentCounts.get(`transition:${t.id}`) ?? 0,
        },
      };
      const before = previousEdges.current.get(t.id);
      const kept = before && sameEdge(before, edge) ? before : edge;
      reuse.set(t.id, kept);
      return kept;
    });
    previousEdges.current = reuse;
    return list;
  }, [document, selection, lanes, arrowElasticity, maxElasticity, computeProblems, commentCounts]);

  // ----------------------------------------------------------------- changes
  const onNodesChange = useCallback(
    (changes: NodeChange<StageNode>[]) => {
      let measured: Map<string, Size> | null = null;
      let moving: Map<string, { x: number; y: number }> | null = null;
      const moved = new Map<string, { x: number; y: number }>();
      for (const change of changes) {
        if (change.type === "dimensions" && change.dimensions) {
          const old = sizes.get(change.id);
          if (!old || old.width !== change.dimensions.width || old.height !== change.dimensions.height) {
            measured ??= new Map(sizes);
            measured.set(change.id, change.dimensions);
          }
        } else if (change.type === "position" && change.position && !readOnly) {
          if (change.dragging) {
            moving ??= new Map(dragging);
            moving.set(change.id, change.position);
          } else moved.set(change.id, change.position);
        } else if (change.type === "select" && change.selected && performance.now() - connectedAt.current > CLICK_AFTER_CONNECT_MS) {
          onSelect({ kind: "stage", id: change.id });
        }
      }
      if (measured) setSizes(measured);
      if (moving) setDragging(moving);
      if (moved.size > 0) {
        const next = moveStages(document, moved);
        if (next !== document) onChange(next, moved.size === 1 ? `Move stage ${stageName(document, [...moved.keys()][0]!)}` : "Move stages");
        setDragging((current) => {
          const rest = new Map(current);
          for (const id of moved.keys()) rest.delete(id);
          return rest;
        });
      }
    },
    [sizes, dragging, readOnly, document, onChange, onSelect],
  );

  const onEdgesChange = useCallback(
    (changes: EdgeChange<TransitionEdge>[]) => {
      for (const change of changes) {
        if (change.type === "select" && change.selected) onSelect({ kind: "transition", id: change.id });
      }
    },
    [onSelect],
  );

  const onConnect = useCallback(
    (connection: { source: string; target: string }) => {
      if (readOnly) return;
      const result = addTransition(document, connection.source, connection.target);
      if (!result.ok) return setNotice(result.reason);
      const added = result.document.transitions.at(-1)!;
      onChange(result.document, `Add ${KIND_LABELS[added.kind].toLowerCase()} arrow ${arrowName(document, added)}`);
      onSelect({ kind: "transition", id: result.id });
      // The mouse-up that ends the drag also clicks the stage under it; the new arrow stays selected.
      connectedAt.current = performance.now();
    },
    [readOnly, document, onChange, onSelect],
  );

  const focusInspector = () => window.requestAnimationFrame(() => window.document.getElementById(INSPECTOR_FIRST_FIELD)?.focus());

  const removeSelection = useCallback(
    (target: { kind: "stage" | "transition"; id: string }) => {
      if (readOnly) return;
      if (target.kind === "stage") onChange(removeElements(document, [target.id], []), `Delete stage ${stageName(document, target.id)}`);
      else {
        const t = document.transitions.find((x) => x.id === target.id);
        if (!t) return;
        onChange(removeElements(document, [], [t.id]), `Delete arrow ${arrowName(document, t)}`);
      }
      onSelect(null);
      canvasRef.current?.focus();
    },
    [readOnly, document, onChange, onSelect],
  );

  /** Keyboard: Enter edits the focused stage or arrow, Delete removes it, Escape clears the selection. */
  const onCanvasKeyDown = (event: KeyboardEvent<HTMLDivElement>) => {
    const element = (event.target as HTMLElement).closest<HTMLElement>(".react-flow__node, .react-flow__edge");
    const id = element?.dataset.id;
    const kind: "stage" | "transition" = element?.classList.contains("react-flow__node") ? "stage" : "transition";
    if (event.key === "Enter" && id) {
      event.preventDefault();
      onSelect({ kind, id });
      focusInspector();
    } else if ((event.key === "Delete" || event.key === "Backspace") && !readOnly) {
      const target = id ? { kind, id } : selection?.kind === "stage" || selection?.kind === "transition" ? selection : null;
      if (target) {
        event.preventDefault();
        removeSelection(target);
      }
    } else if (event.key === "Escape") {
      onSelect(null);
    }
  };

  // ----------------------------------------------------------------- toolbar
  const onAddStage = () => {
    const bounds = canvasRef.current?.getBoundingClientRect();
    const near = bounds
      ? flow.screenToFlowPosition({ x: bounds.left + bounds.width / 2 - DEFAULT_STAGE_SIZE.width / 2, y: bounds.top + bounds.height / 2 - DEFAULT_STAGE_SIZE.height / 2 })
      : undefined;
    const result = addStage(document, document.stages.length === 0 ? near : undefined);
    if (!result.ok) return setNotice(result.reason);
    onChange(result.document, "Add stage");
    onSelect({ kind: "stage", id: result.id });
    // Bring the new stage into view if it landed outside, then let the person name it.
    const added = result.document.stages.at(-1);
    if (added && bounds) {
      const topLeft = flow.screenToFlowPosition({ x: bounds.left, y: bounds.top });
      const bottomRight = flow.screenToFlowPosition({ x: bounds.right, y: bounds.bottom });
      const inside =
        added.position.x >= topLeft.x &&
        added.position.y >= topLeft.y &&
        added.position.x + DEFAULT_STAGE_SIZE.width <= bottomRight.x &&
        added.position.y + DEFAULT_STAGE_SIZE.height <= bottomRight.y;
      if (!inside) window.setTimeout(() => void flow.fitView({ padding: 0.25, maxZoom: 1.2, duration: 200 }), 60);
    }
    window.requestAnimationFrame(() => {
      const field = window.document.getElementById(INSPECTOR_FIRST_FIELD);
      if (field instanceof HTMLInputElement) {
        field.focus();
        field.select();
      }
    });
  };

  const onArrange = () => {
    const positions = layoutStages(document, sizes);
    const next = moveStages(document, positions);
    if (next !== document) onChange(next, "Arrange stages automatically");
    window.setTimeout(() => void flow.fitView({ padding: 0.2, duration: 250 }), 60);
  };

  const onExport = async (format: "svg" | "png") => {
    setExportError(null);
    try {
      const drawing = diagramSvg(document, sizes, analysis.stale ? new Map() : readouts);
      const blob = format === "svg" ? new Blob([drawing.svg], { type: "image/svg+xml" }) : await svgToPng(drawing);
      downloadBlob(blob, `${fileSlug(document.name)}-diagram.${format}`);
    } catch (error) {
      setExportError(error instanceof Error ? error.message : "The export failed.");
    }
  };

  // --------------------------------------------------------------- inspector
  const selectedStage = selection?.kind === "stage" ? document.stages.find((s) => s.id === selection.id) : undefined;
  const selectedTransition = selection?.kind === "transition" ? document.transitions.find((t) => t.id === selection.id) : undefined;
  const selectedElasticity = selectedTransition ? elasticities.get(selectedTransition.id) : undefined;

  return (
    <div className="grid gap-4 lg:grid-cols-[minmax(0,1fr)_20rem]">
      <div className="min-w-0 space-y-2">
        <div className="flex flex-wrap items-center gap-2" role="toolbar" aria-label="Diagram">
          {!readOnly && (
            <>
              <Button size="sm" onClick={onAddStage}>
                Add stage
              </Button>
              <Button size="sm" variant="secondary" onClick={onArrange} disabled={document.stages.length === 0}>
                Arrange automatically
              </Button>
            </>
          )}
          <Button size="sm" variant="secondary" onClick={() => void flow.fitView({ padding: 0.2, duration: 250 })} disabled={document.stages.length === 0}>
            Fit to view
          </Button>
          <label className="inline-flex items-center gap-2 rounded-md px-2 py-1 text-sm font-bold">
            <input type="checkbox" checked={shadeByElasticity} onChange={(event) => setShadeByElasticity(event.target.checked)} className="size-4 accent-indigo" />
            Shade arrows by elasticity
          </label>
          <span className="ml-auto flex items-center gap-1 text-sm font-bold" role="group" aria-label="Download the diagram">
            <span aria-hidden="true">Download:</span>
            <Button size="sm" variant="secondary" aria-label="Download the diagram as SVG" onClick={() => void onExport("svg")} disabled={document.stages.length === 0}>
              SVG
            </Button>
            <Button size="sm" variant="secondary" aria-label="Download the diagram as PNG" onClick={() => void onExport("png")} disabled={document.stages.length === 0}>
              PNG
            </Button>
          </span>
        </div>
        {shadeByElasticity && !shading && (
          <p className="text-sm text-ink/80" role="status">
            Elasticities appear once the life cycle can be analysed (it needs stages, arrows and a growth rate above 0).
          </p>
        )}
        {shading && (
          <p className="text-sm text-ink/80">
            Thicker, darker arrows have larger elasticity: a proportional change in their rate changes λ more.
            {analysis.stale && <span className="font-bold text-ink"> These are from before your last change: {STALE_LONG[reason]}.</span>}
          </p>
        )}
        {notice && (
          <p role="status" className="rounded-md border-l-4 border-ochre bg-ochre/10 px-3 py-2 text-sm">
            {notice}
          </p>
        )}
        {exportError && (
          <p role="alert" className="text-sm font-bold text-brick">
            {exportError}
          </p>
        )}
        <div ref={canvasRef} tabIndex={-1} className="sw-diagram h-[34rem] rounded-lg border border-ink/15 bg-white" onKeyDown={onCanvasKeyDown}>
          <ReactFlow<StageNode, TransitionEdge>
            nodes={nodes}
            edges={edges}
            nodeTypes={nodeTypes}
            edgeTypes={edgeTypes}
            onNodesChange={onNodesChange}
            onEdgesChange={onEdgesChange}
            onConnect={onConnect}
            onPaneClick={() => onSelect(null)}
            nodesDraggable={!readOnly}
            nodesConnectable={!readOnly}
            edgesReconnectable={false}
            deleteKeyCode={null}
            selectionKeyCode={null}
            multiSelectionKeyCode={null}
            connectionRadius={30}
            minZoom={0.2}
            maxZoom={2.5}
            fitView
            fitViewOptions={{ padding: 0.25, maxZoom: 1.2 }}
            aria-label="Life-cycle diagram"
          >
            <Background gap={24} color="#d9d4c7" />
            <Controls showInteractive={false} />
          </ReactFlow>
        </div>
        <Legend readOnly={readOnly} />
      </div>

      <aside aria-label="Inspector" className="space-y-3 rounded-lg border border-ink/15 bg-white p-4">
        {selectedStage ? (
          <StageInspector
            key={selectedStage.id}
            document={document}
            stage={selectedStage}
            readOnly={readOnly}
            readout={readouts.get(selectedStage.id) ?? null}
            onChange={onChange}
            onSelect={onSelect}
            onNotice={setNotice}
          />
        ) : selectedTransition ? (
          <TransitionInspector
            key={selectedTransition.id}
            document={document}
            transition={selectedTransition}
            readOnly={readOnly}
            computeProblem={computeProblems.get(selectedTransition.id) ?? null}
            elasticity={selectedElasticity === undefined ? null : { value: selectedElasticity, stale: analysis.stale, note: STALE_LONG[reason] }}
            onChange={onChange}
            onSelect={onSelect}
          />
        ) : (
          <div className="space-y-2 text-sm">
            <h3 className="text-lg font-bold">Inspector</h3>
            {document.stages.length === 0 ? (
              <p>{readOnly ? "This life cycle has no stages yet." : "Start with “Add stage”. Then drag from a stage’s round knob to another stage to draw an arrow."}</p>
            ) : (
              <p>Select a stage or an arrow to {readOnly ? "see" : "edit"} it.</p>
            )}
          </div>
        )}
      </aside>
    </div>
  );
}

function Legend({ readOnly }: { readOnly: boolean }) {
  return (
    <div className="flex flex-wrap items-center gap-x-5 gap-y-1 text-sm text-ink/85">
      <span className="inline-flex items-center gap-2">
        <svg width="36" height="10" aria-hidden="true">
          <line x1="0" y1="5" x2="36" y2="5" stroke={SPRUCE} strokeWidth="2.5" />
        </svg>
        Survival: growth, stasis, shrinkage
      </span>
      <span className="inline-flex items-center gap-2">
        <svg width="36" height="10" aria-hidden="true">
          <line x1="0" y1="5" x2="36" y2="5" stroke={CLAY} strokeWidth="2.5" strokeDasharray={REPRODUCTION_DASH} />
        </svg>
        Reproduction (dashed)
      </span>
      <span>
        Keyboard: Tab to a stage or arrow, Enter to {readOnly ? "see" : "edit"} it{readOnly ? "" : ", Delete to remove it, arrow keys to move a selected stage"}.
      </span>
    </div>
  );
}

/** The Diagram tab. Takes the editor's panel props like every other tab. */
export function DiagramPanel(props: EditorPanelProps) {
  return (
    <ReactFlowProvider>
      <DiagramEditor {...props} />
    </ReactFlowProvider>
  );
}
