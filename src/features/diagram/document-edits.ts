/**
 * The diagram's edits as pure functions: a document in, a new document out
 * (or a reason the edit cannot be made). The rules are the format's
 * (shared/lifecycle/schema.ts): stage names differ; stasis stays in its
 * stage; growth and shrinkage never loop; between two stages the survival
 * move is growth or shrinkage, not both; one arrow per stage pair and kind.
 */
import { MAX_COORDINATE, MAX_STAGES, MAX_TRANSITIONS, newId, type LifeCycle, type Stage, type Transition, type TransitionKind } from "../../../shared/lifecycle";
import { DEFAULT_STAGE_SIZE } from "./geometry";

export type EditResult = { ok: true; document: LifeCycle; id: string } | { ok: false; reason: string };

export const KIND_LABELS: Record<TransitionKind, string> = {
  growth: "Growth",
  stasis: "Stasis",
  shrinkage: "Shrinkage",
  reproduction: "Reproduction",
};

export function stageName(document: LifeCycle, id: string): string {
  return document.stages.find((s) => s.id === id)?.name ?? "(missing stage)";
}

/** "Juvenile → Adult", or "Adult ↺" for a loop. */
export function arrowName(document: LifeCycle, t: Pick<Transition, "from" | "to">): string {
  return t.from === t.to ? `${stageName(document, t.from)} ↺` : `${stageName(document, t.from)} → ${stageName(document, t.to)}`;
}

/** "Stage 4" (or the next free number). */
export function nextStageName(document: LifeCycle): string {
  const taken = new Set(document.stages.map((s) => s.name));
  let n = document.stages.length + 1;
  while (taken.has(`Stage ${n}`)) n += 1;
  return `Stage ${n}`;
}

const clampCoordinate = (v: number) => Math.max(-MAX_COORDINATE, Math.min(MAX_COORDINATE, Math.round(v)));

/** A free spot: right of the right-most stage on the top row, or `near` when given and free. */
export function freePosition(document: LifeCycle, near?: { x: number; y: number }): { x: number; y: number } {
  const overlaps = (p: { x: number; y: number }) =>
    document.stages.some((s) => Math.abs(s.position.x - p.x) < DEFAULT_STAGE_SIZE.width + 20 && Math.abs(s.position.y - p.y) < DEFAULT_STAGE_SIZE.height + 40);
  if (near && !overlaps(near)) return { x: clampCoordinate(near.x), y: clampCoordinate(near.y) };
  if (document.stages.length === 0) return { x: 80, y: 140 };
  const right = Math.max(...document.stages.map((s) => s.position.x));
  const top = Math.min(...document.stages.map((s) => s.position.y));
  let p = { x: right + DEFAULT_STAGE_SIZE.width + 90, y: top };
  while (overlaps(p)) p = { x: p.x + 40, y: p.y + 40 };
  return { x: clampCoordinate(p.x), y: clampCoordinate(p.y) };
}

export function addStage(document: LifeCycle, near?: { x: number; y: number }): EditResult {
  if (document.stages.length >= MAX_STAGES) return { ok: false, reason: `A life cycle has at most ${MAX_STAGES} stages.` };
  const stage: Stage = { id: newId("st"), name: nextStageName(document), position: freePosition(document, near) };
  return { ok: true, document: { ...document, stages: [...document.stages, stage] }, id: stage.id };
}

function replaceStage(document: LifeCycle, id: string, patch: Partial<Stage>): LifeCycle {
  return { ...document, stages: document.stages.map((s) => (s.id === id ? { ...s, ...patch } : s)) };
}

/** Why a stage cannot have this name, or null. */
export function stageNameProblem(document: LifeCycle, id: string, name: string): string | null {
  const trimmed = name.trim();
  if (trimmed === "") return "Give the stage a name.";
  if (trimmed.length > 200) return "A stage name has at most 200 characters.";
  if (document.stages.some((s) => s.id !== id && s.name === trimmed)) return `Another stage is already named “${trimmed}”.`;
  return null;
}

export function renameStage(document: LifeCycle, id: string, name: string): EditResult {
  const problem = stageNameProblem(document, id, name);
  if (problem) return { ok: false, reason: problem };
  return { ok: true, document: replaceStage(document, id, { name: name.trim() }), id };
}

export function recolourStage(document: LifeCycle, id: string, color: string | undefined): LifeCycle {
  return {
    ...document,
    stages: document.stages.map((s) => {
      if (s.id !== id) return s;
      const { color: _old, ...rest } = s;
      return color === undefined ? rest : { ...rest, color };
    }),
  };
}

/** New positions for some stages (after a drag, a key press or the automatic layout). */
export function moveStages(document: LifeCycle, positions: ReadonlyMap<string, { x: number; y: number }>): LifeCycle {
  let changed = false;
  const stages = document.stages.map((s) => {
    const p = positions.get(s.id);
    if (!p) return s;
    const position = { x: clampCoordinate(p.x), y: clampCoordinate(p.y) };
    if (position.x === s.position.x && position.y === s.position.y) return s;
    changed = true;
    return { ...s, position };
  });
  return changed ? { ...document, stages } : document;
}

/** Removes stages and arrows; arrows of a removed stage go with it. */
export function removeElements(document: LifeCycle, stageIds: Iterable<string>, transitionIds: Iterable<string>): LifeCycle {
  const stages = new Set(stageIds);
  const transitions = new Set(transitionIds);
  return {
    ...document,
    stages: document.stages.filter((s) => !stages.has(s.id)),
    transitions: document.transitions.filter((t) => !transitions.has(t.id) && !stages.has(t.from) && !stages.has(t.to)),
  };
}

/** The kinds an arrow from `from` to `to` may have, given the other arrows (the arrow `ignoreId` aside). */
export function allowedKinds(document: LifeCycle, from: string, to: string, ignoreId?: string): TransitionKind[] {
  const others = document.transitions.filter((t) => t.id !== ignoreId && t.from === from && t.to === to);
  const has = (kind: TransitionKind) => others.some((t) => t.kind === kind);
  if (from === to) return (["stasis", "reproduction"] as const).filter((k) => !has(k));
  const survivalTaken = has("growth") || has("shrinkage");
  return (["growth", "shrinkage", "reproduction"] as const).filter((k) => (k === "reproduction" ? !has(k) : !survivalTaken));
}

/**
 * A new arrow from one stage to another (or a loop). Its kind is growth (or
 * stasis for a loop); when that already exists, reproduction; when both
 * exist, there is nothing to add.
 */
export function addTransition(document: LifeCycle, from: string, to: string, preferred?: TransitionKind): EditResult {
  if (!document.stages.some((s) => s.id === from) || !document.stages.some((s) => s.id === to)) return { ok: false, reason: "Both ends of an arrow must be stages." };
  if (document.transitions.length >= MAX_TRANSITIONS) return { ok: false, reason: `A life cycle has at most ${MAX_TRANSITIONS} arrows.` };
  const allowed = allowedKinds(document, from, to);
  const kind = preferred && allowed.includes(preferred) ? preferred : allowed[0];
  if (kind === undefined) {
    return {
      ok: false,
      reason:
        from === to
          ? `${stageName(document, from)} already has a stasis loop and a reproduction loop; edit those instead.`
          : `${arrowName(document, { from, to })} already has a survival arrow and a reproduction arrow; edit those instead.`,
    };
  }
  const transition: Transition = { id: newId("tr"), from, to, kind, rate: 0 };
  return { ok: true, document: { ...document, transitions: [...document.transitions, transition] }, id: transition.id };
}

export function updateTransition(document: LifeCycle, id: string, patch: Partial<Pick<Transition, "kind" | "rate">>): LifeCycle {
  return { ...document, transitions: document.transitions.map((t) => (t.id === id ? { ...t, ...patch } : t)) };
}

/** Adds vital rates by name (value 0) so a formula that uses them can be kept; the Rates tab sets their values. */
export function addRates(document: LifeCycle, names: readonly string[]): LifeCycle {
  const existing = new Set(document.rates.map((r) => r.name));
  const fresh = [...new Set(names)].filter((n) => !existing.has(n)).map((name) => ({ id: newId("vr"), name, value: 0 }));
  return fresh.length === 0 ? document : { ...document, rates: [...document.rates, ...fresh] };
}
