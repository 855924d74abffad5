import { useState } from "react";
import type { LifeCycle, Transition, TransitionKind } from "../../../shared/lifecycle";
import type { Selection } from "../../lib/editor-types";
import { Button } from "../../components/ui/button";
import { SelectField, TextField } from "../../components/ui/field";
import { KIND_LABELS, addRates, allowedKinds, arrowName, removeElements, updateTransition } from "./document-edits";
import { readRate, rateToText } from "./rate-text";
import { formatElasticity } from "./readouts";
import { INSPECTOR_FIRST_FIELD } from "./stage-inspector";

type TransitionInspectorProps = {
  document: LifeCycle;
  transition: Transition;
  readOnly: boolean;
  /** Why the server could not compute this arrow's rate (from the latest analysis), if it could not. */
  computeProblem: string | null;
  /** The arrow's elasticity (share of λ's proportional response), when known. */
  elasticity: { value: number; stale: boolean; note: string } | null;
  onChange: (next: LifeCycle, label: string) => void;
  onSelect: (selection: Selection | null) => void;
};

const KIND_HELP: Record<TransitionKind, string> = {
  growth: "Survives and moves on to a later stage.",
  stasis: "Survives and stays in the same stage.",
  shrinkage: "Survives and moves back to an earlier stage.",
  reproduction: "Offspring produced into the receiving stage (drawn dashed).",
};

/** Edit one arrow: its kind and its rate (a number or a formula, checked as typed). */
export function TransitionInspector({ document, transition, readOnly, computeProblem, elasticity, onChange, onSelect }: TransitionInspectorProps) {
  const [rateDraft, setRateDraft] = useState<string | null>(null);
  const text = rateDraft ?? rateToText(transition.rate);
  const reading = readRate(text, document);
  const kinds = [transition.kind, ...allowedKinds(document, transition.from, transition.to, transition.id).filter((k) => k !== transition.kind)];
  const name = arrowName(document, transition);
  const rateNames = document.rates.map((r) => r.name);

  const commitRate = (value: string) => {
    setRateDraft(value);
    const next = readRate(value, document);
    if (next.ok && next.rate !== transition.rate) onChange(updateTransition(document, transition.id, { rate: next.rate }), `Set rate of ${name}`);
  };

  return (
    <div className="space-y-4">
      <h3 id={readOnly ? INSPECTOR_FIRST_FIELD : undefined} tabIndex={readOnly ? -1 : undefined} className="text-lg font-bold break-words">
        {KIND_LABELS[transition.kind]} arrow: {name}
      </h3>

      {readOnly ? (
        <dl className="grid grid-cols-[auto_1fr] gap-x-3 gap-y-1 text-sm">
          <dt className="font-bold">Kind</dt>
          <dd>{KIND_LABELS[transition.kind]}</dd>
          <dt className="font-bold">Rate</dt>
          <dd className="break-all font-mono">{rateToText(transition.rate)}</dd>
        </dl>
      ) : (
        <>
          <TextField
            id={INSPECTOR_FIRST_FIELD}
            label="Rate"
            value={text}
            onChange={(event) => commitRate(event.target.value)}
            // A rate that does not read stays in the field, with its problem, until it is fixed or replaced.
            onBlur={() => reading.ok && setRateDraft(null)}
            error={reading.ok ? undefined : reading.message}
            description={
              reading.ok
                ? reading.as === "number"
                  ? "Reads as a number."
                  : "Reads as a formula of vital rates."
                : "A number such as 0.45, or a formula of vital rates such as s_j * (1 - g_j)."
            }
            className="font-mono"
            autoComplete="off"
            spellCheck={false}
          />
          {!reading.ok && reading.unknownRates.length > 0 && (
            <Button
              size="sm"
              variant="secondary"
              onClick={() => {
                const withRates = addRates(document, reading.unknownRates);
                const check = readRate(text, withRates);
                if (check.ok) onChange(updateTransition(withRates, transition.id, { rate: check.rate }), `Set rate of ${name}`);
                setRateDraft(null);
              }}
            >
              Add {reading.unknownRates.join(", ")} to the vital rates (value 0)
            </Button>
          )}
          <p className="text-sm text-ink/80">
            {rateNames.length > 0 ? (
              <>
                Vital rates: <span className="font-mono">{rateNames.join(", ")}</span>
              </>
            ) : (
              "No vital rates yet: add them on the Rates tab to use them in formulas."
            )}
          </p>
          <SelectField
            label="Kind"
            value={transition.kind}
            description={KIND_HELP[transition.kind]}
            onChange={(event) => onChange(updateTransition(document, transition.id, { kind: event.target.value as TransitionKind }), `Change kind of ${name}`)}
          >
            {kinds.map((k) => (
              <option key={k} value={k}>
                {KIND_LABELS[k]}
              </option>
            ))}
          </SelectField>
        </>
      )}

      {computeProblem && (
        <p className="text-sm font-bold text-brick" role="alert">
          <span aria-hidden="true">✕ </span>
          Cannot compute this rate: {computeProblem}
        </p>
      )}

      {elasticity && (
        <p className={`text-sm ${elasticity.stale ? "text-ink/60" : ""}`}>
          <span className="font-bold">Elasticity of λ:</span> <span className="tabular-nums">{formatElasticity(elasticity.value)}</span>
          {elasticity.stale && <span className="text-ink"> (from before your last change; {elasticity.note})</span>}
        </p>
      )}

      <div className="flex flex-wrap gap-2">
        <Button size="sm" variant="secondary" onClick={() => onSelect({ kind: "stage", id: transition.from })}>
          Go to {transition.from === transition.to ? "stage" : "source stage"}
        </Button>
        {!readOnly && (
          <Button
            variant="danger"
            size="sm"
            onClick={() => {
              onChange(removeElements(document, [], [transition.id]), `Delete arrow ${name}`);
              onSelect(null);
            }}
          >
            Delete arrow
          </Button>
        )}
      </div>
    </div>
  );
}
