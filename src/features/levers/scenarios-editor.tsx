/**
 * Building scenarios: each is a named management action with its changes to
 * vital rates or matrix entries, an optional cost, and per change an optional
 * largest achievable amount. Every edit goes into the document (saved, undone
 * and snapshotted like any other change); a change that breaks a bound is
 * refused under the form with the rate or entry and the bound named.
 */
import { type FormEvent, useId, useState } from "react";
import type { LifeCycle, Scenario, ScenarioChange } from "../../../shared/lifecycle";
import { Button } from "../../components/ui/button";
import { CommitInput } from "../../components/ui/commit-input";
import { SelectField, TextField } from "../../components/ui/field";
import { formatNumber } from "../../lib/number-format";
import { parseNumberInput } from "../../lib/number-input";
import { addScenario, freshScenarioName, newChange, opText, removeScenario, scenarioProblem, targetLabel, targetOptions, updateScenario } from "./scenario-edits";

interface Props {
  document: LifeCycle;
  readOnly: boolean;
  onChange: (next: LifeCycle, label: string) => void;
}

const OPS: { value: ScenarioChange["op"]; label: string }[] = [
  { value: "multiply", label: "multiply by" },
  { value: "add", label: "add" },
  { value: "set", label: "set to" },
];

export function ScenariosEditor({ document: doc, readOnly, onChange }: Props) {
  const scenarios = doc.scenarios ?? [];
  return (
    <div className="space-y-4">
      {scenarios.length === 0 && (
        <p className="rounded-md border border-dashed border-ink/30 p-4 text-ink/80">
          No scenarios yet. A scenario is one management action — "fence the breeding ponds", "head-start efts" — written as the changes it makes to vital rates or
          matrix entries.{readOnly ? "" : " Add one to compare it with the life cycle as it is."}
        </p>
      )}
      {scenarios.map((s, index) => (
        <ScenarioCard key={s.id} doc={doc} scenario={s} index={index} readOnly={readOnly} onChange={onChange} />
      ))}
      {!readOnly && (
        <Button
          variant="secondary"
          onClick={() => {
            const name = freshScenarioName(doc);
            onChange(addScenario(doc, name).document, `Add scenario ${name}`);
          }}
        >
          New scenario
        </Button>
      )}
    </div>
  );
}

function ScenarioCard({ doc, scenario, index, readOnly, onChange }: { doc: LifeCycle; scenario: Scenario; index: number; readOnly: boolean; onChange: Props["onChange"] }) {
  const headingId = useId();
  const update = (patch: (s: Scenario) => Scenario, label: string) => onChange(updateScenario(doc, scenario.id, patch), label);
  const checkWith = (next: Scenario) => scenarioProblem(doc, next);
  return (
    <section aria-labelledby={headingId} className="space-y-3 rounded-md border border-ink/20 bg-white p-4" data-testid="scenario">
      <div className="flex flex-wrap items-start justify-between gap-3">
        <h4 id={headingId} className="text-base font-bold">
          {scenario.name}
        </h4>
        {!readOnly && (
          <Button variant="quiet" size="sm" onClick={() => onChange(removeScenario(doc, scenario.id), `Delete scenario ${scenario.name}`)}>
            Delete scenario {index + 1}
          </Button>
        )}
      </div>
      {readOnly ? (
        <dl className="grid gap-1 text-sm sm:grid-cols-[10rem_1fr]">
          <dt className="font-bold">Action</dt>
          <dd>{scenario.action || "—"}</dd>
          <dt className="font-bold">Cost</dt>
          <dd>{scenario.cost === undefined ? "—" : formatNumber(scenario.cost, 6)}</dd>
        </dl>
      ) : (
        <div className="grid gap-3 sm:grid-cols-[1fr_2fr_10rem]">
          <div className="space-y-1 text-sm">
            <span className="block font-bold">Scenario name</span>
            <CommitInput
              label="Scenario name"
              value={scenario.name}
              check={(t) => ({ error: t.trim() === "" ? "Give the scenario a name." : (doc.scenarios ?? []).some((o) => o.id !== scenario.id && o.name === t.trim()) ? "Another scenario has this name." : null })}
              onCommit={(t) => update((s) => ({ ...s, name: t.trim() }), `Rename scenario ${scenario.name}`)}
            />
          </div>
          <div className="space-y-1 text-sm">
            <span className="block font-bold">Management action</span>
            <CommitInput
              label="Management action"
              value={scenario.action ?? ""}
              placeholder="What would be done, where, by whom"
              onCommit={(t) =>
                update(({ action: _old, ...s }) => (t.trim() === "" ? s : { ...s, action: t.trim() }), `Describe scenario ${scenario.name}`)
              }
            />
          </div>
          <div className="space-y-1 text-sm">
            <span className="block font-bold">Cost (optional)</span>
            <CommitInput
              label="Cost"
              value={scenario.cost === undefined ? "" : String(scenario.cost)}
              placeholder="e.g. 12"
              check={(t) => {
                if (t.trim() === "") return {};
                const v = parseNumberInput(t);
                return { error: v === null ? "A cost is a number, e.g. 12." : v < 0 ? "A cost cannot be negative." : null };
              }}
              onCommit={(t) =>
                update(({ cost: _old, ...s }) => {
                  const v = parseNumberInput(t);
                  return v === null ? s : { ...s, cost: v };
                }, `Cost of scenario ${scenario.name}`)
              }
            />
          </div>
        </div>
      )}

      <table className="w-full border-collapse text-left text-sm">
        <caption className="sr-only">Changes made by {scenario.name}</caption>
        <thead>
          <tr className="border-b-2 border-ink/20">
            <th scope="col" className="px-2 py-1">
              Changes
            </th>
            <th scope="col" className="px-2 py-1">
              Amount
            </th>
            <th scope="col" className="px-2 py-1">
              Largest achievable
            </th>
            {!readOnly && (
              <th scope="col" className="px-2 py-1">
                <span className="sr-only">Remove</span>
              </th>
            )}
          </tr>
        </thead>
        <tbody>
          {scenario.changes.length === 0 && (
            <tr>
              <td colSpan={4} className="px-2 py-2 text-ink/75">
                No changes yet: this scenario is the life cycle as it is.
              </td>
            </tr>
          )}
          {scenario.changes.map((c) => {
            const with_ = (patch: Partial<ScenarioChange>): Scenario => ({ ...scenario, changes: scenario.changes.map((x) => (x.id === c.id ? { ...x, ...patch } : x)) });
            const amountCheck = (t: string, field: "value" | "achievable") => {
              if (field === "achievable" && t.trim() === "") return {};
              const v = parseNumberInput(t);
              if (v === null) return { error: "Type a number." };
              return { error: checkWith(with_({ [field]: v })) };
            };
            const name = targetLabel(doc, c.target);
            return (
              <tr key={c.id} className="border-b border-ink/10">
                <th scope="row" className="px-2 py-1 font-normal">
                  <span className="font-bold">{name}</span> <span className="text-ink/80">{OPS.find((o) => o.value === c.op)?.label}</span>
                </th>
                <td className="px-2 py-1">
                  {readOnly ? (
                    opText(c.op, c.value)
                  ) : (
                    <CommitInput
                      label={`Amount of the change to ${name}`}
                      value={String(c.value)}
                      inputClassName="w-28"
                      check={(t) => amountCheck(t, "value")}
                      onCommit={(t) => update(() => with_({ value: parseNumberInput(t)! }), `Change ${name} in ${scenario.name}`)}
                    />
                  )}
                </td>
                <td className="px-2 py-1">
                  {readOnly ? (
                    c.achievable === undefined ? "—" : opText(c.op, c.achievable)
                  ) : (
                    <CommitInput
                      label={`Largest achievable change to ${name}`}
                      value={c.achievable === undefined ? "" : String(c.achievable)}
                      placeholder="optional"
                      inputClassName="w-28"
                      check={(t) => amountCheck(t, "achievable")}
                      onCommit={(t) =>
                        update(() => {
                          const v = parseNumberInput(t);
                          const next = with_({ achievable: v ?? 0 });
                          if (v === null) next.changes = next.changes.map((x) => (x.id === c.id ? (({ achievable: _drop, ...rest }) => rest)(x) : x));
                          return next;
                        }, `Achievable change to ${name} in ${scenario.name}`)
                      }
                    />
                  )}
                </td>
                {!readOnly && (
                  <td className="px-2 py-1 text-right">
                    <Button
                      variant="quiet"
                      size="sm"
                      onClick={() => update((s) => ({ ...s, changes: s.changes.filter((x) => x.id !== c.id) }), `Remove a change from ${scenario.name}`)}
                    >
                      Remove<span className="sr-only"> the change to {name}</span>
                    </Button>
                  </td>
                )}
              </tr>
            );
          })}
        </tbody>
      </table>
      {!readOnly && <AddChangeForm doc={doc} scenario={scenario} onAdd={(next, label) => update(() => next, label)} />}
    </section>
  );
}

function AddChangeForm({ doc, scenario, onAdd }: { doc: LifeCycle; scenario: Scenario; onAdd: (next: Scenario, label: string) => void }) {
  const options = targetOptions(doc);
  const [targetKey, setTargetKey] = useState(options[0]?.key ?? "");
  const [op, setOp] = useState<ScenarioChange["op"]>("multiply");
  const [amount, setAmount] = useState("");
  const [achievable, setAchievable] = useState("");
  const [problem, setProblem] = useState<{ field: "amount" | "achievable" | "target"; message: string } | null>(null);
  const problemId = useId();

  if (options.length === 0) return <p className="text-sm text-ink/80">Add vital rates or arrows first: a change moves one of them.</p>;

  function submit(event: FormEvent) {
    event.preventDefault();
    const option = options.find((o) => o.key === targetKey);
    if (!option) return setProblem({ field: "target", message: "Choose what the change moves." });
    const value = parseNumberInput(amount);
    if (value === null) return setProblem({ field: "amount", message: "Type the amount, e.g. 1.2 to multiply by 1.2." });
    const best = achievable.trim() === "" ? undefined : parseNumberInput(achievable);
    if (best === null) return setProblem({ field: "achievable", message: "The largest achievable amount is a number, or leave it empty." });
    const change = newChange(option.target, op, value, best);
    const next = { ...scenario, changes: [...scenario.changes, change] };
    const message = scenarioProblem(doc, next);
    if (message) return setProblem({ field: /achievable/.test(message) ? "achievable" : "amount", message });
    setProblem(null);
    setAmount("");
    setAchievable("");
    onAdd(next, `Add a change to ${scenario.name}`);
  }

  return (
    <form onSubmit={submit} className="flex flex-wrap items-end gap-3 border-t border-ink/10 pt-3" aria-label={`Add a change to ${scenario.name}`}>
      <SelectField label="Change" value={targetKey} onChange={(e) => setTargetKey(e.target.value)} fieldClassName="min-w-56">
        {options.map((o) => (
          <option key={o.key} value={o.key}>
            {o.label}
          </option>
        ))}
      </SelectField>
      <SelectField label="Operation" value={op} onChange={(e) => setOp(e.target.value as ScenarioChange["op"])}>
        {OPS.map((o) => (
          <option key={o.value} value={o.value}>
            {o.label}
          </option>
        ))}
      </SelectField>
      <TextField
        label="Amount"
        inputMode="decimal"
        value={amount}
        onChange={(e) => setAmount(e.target.value)}
        fieldClassName="w-32"
        className={problem?.field === "amount" ? "border-2 border-brick" : ""}
        aria-invalid={problem?.field === "amount" ? true : undefined}
        aria-describedby={problem?.field === "amount" ? problemId : undefined}
      />
      <TextField
        label="Largest achievable (optional)"
        inputMode="decimal"
        value={achievable}
        onChange={(e) => setAchievable(e.target.value)}
        fieldClassName="w-52"
        className={problem?.field === "achievable" ? "border-2 border-brick" : ""}
        aria-invalid={problem?.field === "achievable" ? true : undefined}
        aria-describedby={problem?.field === "achievable" ? problemId : undefined}
      />
      <Button type="submit" variant="secondary">
        Add change
      </Button>
      {problem && (
        <p id={problemId} role="alert" className="w-full text-sm font-bold text-brick">
          <span aria-hidden="true">✕ </span>
          {problem.message}
        </p>
      )}
    </form>
  );
}
