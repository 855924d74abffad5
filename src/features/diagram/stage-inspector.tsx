import { useState } from "react";
import type { LifeCycle, Stage, TransitionKind } from "../../../shared/lifecycle";
import type { Selection } from "../../lib/editor-types";
import { Button } from "../../components/ui/button";
import { SelectField, TextField } from "../../components/ui/field";
import type { StageReadout } from "./diagram-types";
import { KIND_LABELS, addTransition, allowedKinds, arrowName, recolourStage, removeElements, renameStage, stageNameProblem } from "./document-edits";
import { DEFAULT_STAGE_COLOR, STAGE_COLORS } from "./palette";
import { rateLabel } from "./rate-text";
import { STALE_LONG, formatShare, formatValue } from "./readouts";

export const INSPECTOR_FIRST_FIELD = "diagram-inspector-first";

type StageInspectorProps = {
  document: LifeCycle;
  stage: Stage;
  readOnly: boolean;
  readout: StageReadout | null;
  onChange: (next: LifeCycle, label: string) => void;
  onSelect: (selection: Selection | null) => void;
  onNotice: (message: string) => void;
};

/** Edit one stage: name, colour, arrows from it, delete. Read-only people see the same facts without controls. */
export function StageInspector({ document, stage, readOnly, readout, onChange, onSelect, onNotice }: StageInspectorProps) {
  const [nameDraft, setNameDraft] = useState<string | null>(null);
  // Another stage first: a loop has its own "Add stasis" button.
  const [chosenTarget, setTarget] = useState<string>(() => document.stages.find((s) => s.id !== stage.id)?.id ?? stage.id);
  const target = document.stages.some((s) => s.id === chosenTarget) ? chosenTarget : stage.id;
  const nameProblem = nameDraft === null ? null : stageNameProblem(document, stage.id, nameDraft);
  const outgoing = document.transitions.filter((t) => t.from === stage.id);
  const incoming = document.transitions.filter((t) => t.to === stage.id && t.from !== stage.id);
  const targetKinds = allowedKinds(document, stage.id, target);
  const hasStasis = outgoing.some((t) => t.to === stage.id && t.kind === "stasis");

  const addArrow = (to: string, kind?: TransitionKind) => {
    const result = addTransition(document, stage.id, to, kind);
    if (!result.ok) return onNotice(result.reason);
    onChange(result.document, `Add arrow ${arrowName(document, { from: stage.id, to })}`);
    onSelect({ kind: "transition", id: result.id });
  };

  const arrowList = (title: string, list: typeof outgoing) =>
    list.length > 0 && (
      <div>
        <h4 className="text-sm font-bold">{title}</h4>
        <ul className="mt-1 space-y-1">
          {list.map((t) => (
            <li key={t.id}>
              <button type="button" className="text-left text-sm text-indigo underline underline-offset-2 hover:decoration-2" onClick={() => onSelect({ kind: "transition", id: t.id })}>
                {KIND_LABELS[t.kind]}: {arrowName(document, t)} ({rateLabel(t.rate)})
              </button>
            </li>
          ))}
        </ul>
      </div>
    );

  return (
    <div className="space-y-4">
      <h3 id={readOnly ? INSPECTOR_FIRST_FIELD : undefined} tabIndex={readOnly ? -1 : undefined} className="text-lg font-bold break-words">
        Stage: {stage.name}
      </h3>

      {readOnly ? (
        <p className="text-sm">
          <span className="font-bold">Colour:</span> {STAGE_COLORS.find((c) => c.value === (stage.color ?? DEFAULT_STAGE_COLOR))?.name ?? stage.color}
        </p>
      ) : (
        <>
          <TextField
            id={INSPECTOR_FIRST_FIELD}
            label="Stage name"
            value={nameDraft ?? stage.name}
            error={nameProblem ?? undefined}
            onChange={(event) => {
              const text = event.target.value;
              setNameDraft(text);
              const result = renameStage(document, stage.id, text);
              if (result.ok && text.trim() !== stage.name) onChange(result.document, "Rename stage");
            }}
            onBlur={() => nameProblem === null && setNameDraft(null)}
            autoComplete="off"
          />
          <fieldset>
            <legend className="font-bold">Colour</legend>
            <div className="mt-1 flex flex-wrap items-center gap-1.5">
              {STAGE_COLORS.map((c) => {
                const active = (stage.color ?? DEFAULT_STAGE_COLOR).toLowerCase() === c.value;
                return (
                  <button
                    key={c.value}
                    type="button"
                    aria-pressed={active}
                    aria-label={c.name}
                    title={c.name}
                    onClick={() => onChange(recolourStage(document, stage.id, c.value === DEFAULT_STAGE_COLOR ? undefined : c.value), "Recolour stage")}
                    className={`size-7 rounded-full border-2 ${active ? "border-ink ring-2 ring-indigo ring-offset-1" : "border-white"}`}
                    style={{ backgroundColor: c.value }}
                  />
                );
              })}
              <label className="ml-1 inline-flex items-center gap-1 text-sm">
                <span>Other</span>
                <input
                  type="color"
                  value={stage.color ?? DEFAULT_STAGE_COLOR}
                  onChange={(event) => onChange(recolourStage(document, stage.id, event.target.value), "Recolour stage")}
                  className="h-7 w-9 cursor-pointer rounded border border-ink/30 bg-white"
                />
              </label>
            </div>
          </fieldset>
        </>
      )}

      {readout && (
        <dl className={`grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 rounded-md border border-ink/15 bg-paper p-3 text-sm ${readout.stale ? "text-ink/60" : ""}`}>
          <dt className="font-bold">Stable-stage share</dt>
          <dd className="tabular-nums">{formatShare(readout.share)}</dd>
          <dt className="font-bold">Reproductive value</dt>
          <dd className="tabular-nums">{formatValue(readout.value)}</dd>
          {readout.stale && <dd className="col-span-2 text-ink">From before your last change; {STALE_LONG[readout.staleReason]}</dd>}
        </dl>
      )}

      {arrowList("Arrows from this stage", outgoing)}
      {arrowList("Arrows into this stage", incoming)}

      {!readOnly && (
        <div className="space-y-2 rounded-md border border-ink/15 p-3">
          <h4 className="font-bold">Add an arrow from {stage.name}</h4>
          <SelectField label="To stage" value={target} onChange={(event) => setTarget(event.target.value)}>
            {document.stages.map((s) => (
              <option key={s.id} value={s.id}>
                {s.id === stage.id ? `${s.name} (loop)` : s.name}
              </option>
            ))}
          </SelectField>
          <div className="flex flex-wrap gap-2">
            <Button size="sm" variant="secondary" disabled={targetKinds.length === 0} onClick={() => addArrow(target)}>
              {targetKinds[0] ? `Add ${KIND_LABELS[targetKinds[0]].toLowerCase()} arrow` : "Nothing left to add"}
            </Button>
            {!hasStasis && target !== stage.id && (
              <Button size="sm" variant="secondary" onClick={() => addArrow(stage.id, "stasis")}>
                Add stasis
              </Button>
            )}
          </div>
        </div>
      )}

      {!readOnly && (
        <Button
          variant="danger"
          size="sm"
          onClick={() => {
            onChange(removeElements(document, [stage.id], []), `Delete stage ${stage.name}`);
            onSelect(null);
          }}
        >
          Delete stage
        </Button>
      )}
    </div>
  );
}
