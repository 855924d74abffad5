/**
 * Rates: the named vital rates that arrow formulas use. Each rate has a
 * value, its uncertainty (SE and/or a confidence interval), a unit, a source
 * and notes. Checks run as the person types; a rename rewrites every formula
 * that uses the rate; each rate lists the arrows whose formulas use it.
 */
import { useEffect, useMemo, useRef, useState } from "react";
import { useSearchParams } from "react-router";
import { checkFormula, MAX_NOTES_LENGTH, MAX_SOURCE_LENGTH, MAX_UNIT_LENGTH, newId, type LifeCycle, type Transition, type VitalRate } from "../../../shared/lifecycle";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { CommitInput } from "../../components/ui/commit-input";
import { ConfirmDialog } from "../../components/ui/dialog";
import type { EditorPanelProps } from "../../lib/editor-types";
import { formatNumber, formatWithUncertainty } from "../../lib/number-format";
import { uncertaintyModel } from "../../../shared/uncertainty";
import { CiEditor } from "./ci-editor";
import { CorrelationsEditor } from "./correlations-editor";
import { arrowsUsingRates, freshRateName, parseNumberInput, probabilityWarnings, rateNameError } from "./rate-checks";
import { removeRateKeepingValues, renameRate } from "./rename-rate";
import { MoreUncertainty } from "./uncertainty-fields";

type RateUpdate = Partial<Omit<VitalRate, "id">>;

/** The rate with `update` applied; `undefined` in the update removes the field. */
function withUpdate(rate: VitalRate, update: RateUpdate): VitalRate {
  const next: Record<string, unknown> = { ...rate };
  for (const [key, value] of Object.entries(update)) {
    if (value === undefined) delete next[key];
    else next[key] = value;
  }
  return next as VitalRate;
}

function updateRate(doc: LifeCycle, rateId: string, update: RateUpdate): LifeCycle {
  return { ...doc, rates: doc.rates.map((r) => (r.id === rateId ? withUpdate(r, update) : r)) };
}

const numberCheck = (text: string) => (parseNumberInput(text) === null ? { error: "Type a number, such as 0.35." } : {});
const optionalNonNegative = (text: string) => {
  if (text.trim() === "") return {};
  const v = parseNumberInput(text);
  return v === null ? { error: "Type a number, or leave it empty." } : v < 0 ? { error: "A standard error cannot be negative." } : {};
};
const maxLength = (limit: number, what: string) => (text: string) => (text.length > limit ? { error: `${what} has at most ${limit} characters.` } : {});

export function RatesPanel({ document: doc, onChange, readOnly, selection, commentCounts }: EditorPanelProps) {
  const usage = useMemo(() => arrowsUsingRates(doc), [doc]);
  const warnings = useMemo(() => probabilityWarnings(doc), [doc]);
  const stageName = useMemo(() => new Map(doc.stages.map((s) => [s.id, s.name])), [doc.stages]);
  const unknownNames = useMemo(() => unknownRateNames(doc), [doc]);
  const uncertainty = useMemo(() => uncertaintyModel(doc), [doc]);
  const issuesOf = (index: number) => uncertainty.issues.filter((i) => i.path[0] === "rates" && i.path[1] === index);
  const [status, setStatus] = useState("");
  const [removing, setRemoving] = useState<VitalRate | null>(null);
  const [openNotes, setOpenNotes] = useState<ReadonlySet<string>>(new Set());
  const focusNameOf = useRef<string | null>(null);
  const selectedRateId = selection?.kind === "rate" ? selection.id : null;
  const rowRefs = useRef(new Map<string, HTMLTableRowElement>());

  useEffect(() => {
    if (selectedRateId) rowRefs.current.get(selectedRateId)?.scrollIntoView({ block: "nearest" });
  }, [selectedRateId]);

  const describeArrow = (t: Transition) => `${stageName.get(t.from) ?? "?"} → ${stageName.get(t.to) ?? "?"}`;

  function addRate(name = freshRateName(doc)) {
    const rate: VitalRate = { id: newId("vr"), name, value: 0 };
    focusNameOf.current = rate.id;
    onChange({ ...doc, rates: [...doc.rates, rate] }, `Add rate ${name}`);
    setStatus(`Added the rate ${name}.`);
  }

  function rename(rate: VitalRate, name: string) {
    const { document: next, changedArrows } = renameRate(doc, rate.id, name);
    onChange(next, `Rename rate ${rate.name} to ${name}`);
    setStatus(
      changedArrows.length === 0
        ? `Renamed ${rate.name} to ${name}.`
        : `Renamed ${rate.name} to ${name}; ${changedArrows.length === 1 ? "1 formula" : `${changedArrows.length} formulas`} updated.`,
    );
  }

  function remove(rate: VitalRate) {
    const { document: next, changedArrows } = removeRateKeepingValues(doc, rate.id);
    onChange(next, `Remove rate ${rate.name}`);
    setStatus(
      changedArrows.length === 0
        ? `Removed the rate ${rate.name}.`
        : `Removed the rate ${rate.name}; its value ${rate.value} now stands in ${changedArrows.length === 1 ? "1 formula" : `${changedArrows.length} formulas`}.`,
    );
    setRemoving(null);
  }

  const set = (rate: VitalRate, update: RateUpdate, label: string) => onChange(updateRate(doc, rate.id, update), label);

  return (
    <section aria-labelledby="rates-heading" className="space-y-4">
      <div className="flex flex-wrap items-end justify-between gap-3">
        <div className="space-y-1">
          <h2 id="rates-heading" className="text-xl font-bold">
            Rates
          </h2>
          <p className="max-w-3xl text-sm text-ink/80">
            Named vital rates that arrow formulas use, such as <code>s_j * (1 - g_j)</code>. Values are per {doc.timeStepUnit}; give the uncertainty when you know it.
            {!readOnly && " Changes apply when you press Enter or leave the field; Escape undoes the typing."}
          </p>
        </div>
        {!readOnly && <Button onClick={() => addRate()}>Add rate</Button>}
      </div>

      <p role="status" className="min-h-5 text-sm text-ink/80">
        {status}
      </p>

      {unknownNames.length > 0 && (
        <Alert tone="warning" title="Some formulas use rates that do not exist yet" live={false}>
          <ul className="space-y-1">
            {unknownNames.map(({ name, arrows }) => (
              <li key={name} className="flex flex-wrap items-center gap-2">
                <span>
                  <code className="font-bold">{name}</code> in {arrows.map((t) => `${describeArrow(t)} (${String(t.rate)})`).join("; ")}
                </span>
                {!readOnly && (
                  <Button size="sm" variant="secondary" onClick={() => addRate(name)}>
                    Add rate {name}
                  </Button>
                )}
              </li>
            ))}
          </ul>
        </Alert>
      )}

      {doc.rates.length === 0 ? (
        <p className="rounded-md border border-dashed border-ink/30 p-4 text-ink/80">
          No vital rates yet. Arrows can carry plain numbers; name a rate when several arrows share it, when you know its uncertainty, or when you want its sensitivity.
        </p>
      ) : (
        <div className="overflow-x-auto">
          <table className="w-full border-collapse text-left text-sm">
            <caption className="sr-only">Vital rates</caption>
            <thead>
              <tr className="border-b-2 border-ink/20 align-bottom">
                <th scope="col" className="px-2 py-2">Name</th>
                <th scope="col" className="px-2 py-2">Value</th>
                <th scope="col" className="px-2 py-2">
                  Uncertainty <span className="font-normal text-ink/75">(SE, CI, counts or a distribution)</span>
                </th>
                <th scope="col" className="px-2 py-2">Unit</th>
                <th scope="col" className="px-2 py-2">Source</th>
                <th scope="col" className="px-2 py-2">Used in</th>
                {!readOnly && (
                  <th scope="col" className="px-2 py-2">
                    <span className="sr-only">Actions</span>
                  </th>
                )}
              </tr>
            </thead>
            <tbody>
              {doc.rates.map((rate, rateIndex) => {
                const arrows = usage.get(rate.name) ?? [];
                const notesOpen = openNotes.has(rate.id);
                const toggleNotes = () =>
                  setOpenNotes((open) => {
                    const next = new Set(open);
                    if (next.has(rate.id)) next.delete(rate.id);
                    else next.add(rate.id);
                    return next;
                  });
                const selected = rate.id === selectedRateId;
                return [
                  <tr
                    key={rate.id}
                    ref={(el) => {
                      if (el) rowRefs.current.set(rate.id, el);
                      else rowRefs.current.delete(rate.id);
                    }}
                    data-rate-id={rate.id}
                    className={`border-b border-ink/10 align-top ${selected ? "bg-indigo/10" : ""}`}
                  >
                    <td className="w-36 px-2 py-2">
                      {readOnly ? (
                        <code className="font-bold">{rate.name}</code>
                      ) : (
                        <CommitInput
                          label={`Name of rate ${rate.name}`}
                          value={rate.name}
                          spellCheck={false}
                          autoComplete="off"
                          inputClassName="font-mono"
                          ref={(el) => {
                            if (el && focusNameOf.current === rate.id) {
                              focusNameOf.current = null;
                              el.focus();
                              el.select();
                            }
                          }}
                          check={(text) => ({ error: rateNameError(doc, rate.id, text) })}
                          onCommit={(text) => rename(rate, text)}
                        />
                      )}
                      {(commentCounts.get(`rate:${rate.id}`) ?? 0) > 0 && (
                        <span className="mt-1 inline-block rounded-full bg-indigo px-1.5 text-[10px] leading-4 font-bold text-white" title="Open review threads on this rate (Review tab)" data-comment-marker="">
                          <span aria-hidden="true">✎ </span>
                          {commentCounts.get(`rate:${rate.id}`)}
                          <span className="sr-only"> open review threads on this rate</span>
                        </span>
                      )}
                    </td>
                    <td className="w-32 px-2 py-2">
                      {readOnly ? (
                        <span className="tabular-nums">{formatNumber(rate.value, 6)}</span>
                      ) : (
                        <CommitInput
                          label={`Value of ${rate.name}`}
                          value={String(rate.value)}
                          inputMode="decimal"
                          check={numberCheck}
                          warning={warnings.get(rate.id)}
                          onCommit={(text) => set(rate, { value: parseNumberInput(text)! }, `Set ${rate.name} to ${parseNumberInput(text)}`)}
                        />
                      )}
                      {readOnly && warnings.get(rate.id) && (
                        <p className="mt-1 text-xs">
                          <span aria-hidden="true" className="font-bold text-ochre">! </span>
                          {warnings.get(rate.id)}
                        </p>
                      )}
                    </td>
                    <td className="min-w-[17.5rem] px-2 py-2">
                      {readOnly ? (
                        <div className="space-y-1">
                          <span className="tabular-nums">
                            {rate.se === undefined && rate.ci === undefined && rate.counts === undefined && rate.distribution === undefined ? (
                              <span className="text-ink/70">not given</span>
                            ) : (
                              (rate.se !== undefined || rate.ci !== undefined) && formatWithUncertainty(rate.value, rate)
                            )}
                          </span>
                          <MoreUncertainty rate={rate} issues={issuesOf(rateIndex)} readOnly onChange={() => {}} />
                        </div>
                      ) : (
                        <div className="space-y-1.5">
                          <label className="flex items-start gap-2">
                            <span className="w-6 pt-1 text-xs font-bold">SE</span>
                            <CommitInput
                              label={`Standard error of ${rate.name}`}
                              value={rate.se === undefined ? "" : String(rate.se)}
                              placeholder="none"
                              inputMode="decimal"
                              className="w-24"
                              check={optionalNonNegative}
                              onCommit={(text) => {
                                const se = text.trim() === "" ? undefined : parseNumberInput(text)!;
                                set(rate, { se }, se === undefined ? `Remove the SE of ${rate.name}` : `Set the SE of ${rate.name} to ${se}`);
                              }}
                            />
                          </label>
                          <CiEditor
                            rateName={rate.name}
                            value={rate.value}
                            ci={rate.ci}
                            onCommit={(ci) => set(rate, { ci }, ci === undefined ? `Remove the CI of ${rate.name}` : `Set the CI of ${rate.name}`)}
                          />
                          <MoreUncertainty rate={rate} issues={issuesOf(rateIndex)} readOnly={false} onChange={(update, label) => set(rate, update, label)} />
                        </div>
                      )}
                    </td>
                    <td className="w-40 px-2 py-2">
                      {readOnly ? (
                        (rate.unit ?? <span className="text-ink/70">—</span>)
                      ) : (
                        <CommitInput
                          label={`Unit of ${rate.name}`}
                          value={rate.unit ?? ""}
                          placeholder="e.g. per female"
                          check={maxLength(MAX_UNIT_LENGTH, "A unit")}
                          onCommit={(text) => set(rate, { unit: text.trim() === "" ? undefined : text }, `Set the unit of ${rate.name}`)}
                        />
                      )}
                    </td>
                    <td className="min-w-44 px-2 py-2">
                      {readOnly ? (
                        (rate.source ?? <span className="text-ink/70">—</span>)
                      ) : (
                        <CommitInput
                          label={`Source of ${rate.name}`}
                          value={rate.source ?? ""}
                          placeholder="citation or data set"
                          check={maxLength(MAX_SOURCE_LENGTH, "A source")}
                          onCommit={(text) => set(rate, { source: text.trim() === "" ? undefined : text }, `Set the source of ${rate.name}`)}
                        />
                      )}
                      {(!readOnly || rate.notes) && (
                        <button type="button" className="mt-1 block text-xs font-bold text-indigo underline-offset-2 hover:underline" aria-expanded={notesOpen} onClick={toggleNotes}>
                          {notesOpen ? "Hide notes" : rate.notes ? `Notes on ${rate.name}…` : `Add notes on ${rate.name}`}
                        </button>
                      )}
                    </td>
                    <td className="min-w-56 px-2 py-2">
                      {arrows.length === 0 ? (
                        <span className="text-ink/70">No arrow uses it yet.</span>
                      ) : (
                        <ul aria-label={`Arrows using ${rate.name}`} className="space-y-0.5">
                          {arrows.map((t) => (
                            <li key={t.id}>
                              <span className="font-bold">{describeArrow(t)}</span> <span className="text-ink/75">({t.kind})</span>: <code className="break-words">{String(t.rate)}</code>
                            </li>
                          ))}
                        </ul>
                      )}
                      <ThermalLink rate={rate} readOnly={readOnly} />
                    </td>
                    {!readOnly && (
                      <td className="px-2 py-2 text-right">
                        <Button variant="quiet" size="sm" onClick={() => (arrows.length > 0 ? setRemoving(rate) : remove(rate))} aria-label={`Remove rate ${rate.name}`}>
                          Remove
                        </Button>
                      </td>
                    )}
                  </tr>,
                  notesOpen && (
                    <tr key={`${rate.id}-notes`} className="border-b border-ink/10">
                      <td colSpan={readOnly ? 6 : 7} className="px-2 pb-3">
                        <NotesEditor rate={rate} readOnly={readOnly} onCommit={(notes) => set(rate, { notes }, `Edit the notes of ${rate.name}`)} />
                      </td>
                    </tr>
                  ),
                ];
              })}
            </tbody>
          </table>
        </div>
      )}

      {doc.rates.length > 1 && <CorrelationsEditor document={doc} readOnly={readOnly} issues={uncertainty.issues} onChange={onChange} />}

      <ConfirmDialog
        open={removing !== null}
        onClose={() => setRemoving(null)}
        onConfirm={() => removing && remove(removing)}
        title={`Remove the rate ${removing?.name ?? ""}?`}
        confirmLabel="Remove and keep the values"
      >
        {removing && (
          <p>
            {(usage.get(removing.name) ?? []).length === 1 ? "One arrow uses" : `${(usage.get(removing.name) ?? []).length} arrows use`} <code>{removing.name}</code>. Its value,{" "}
            <span className="tabular-nums">{removing.value}</span>, will be written into their formulas in its place, so the matrix stays the same but no longer follows this rate. Undo
            brings the rate back.
          </p>
        )}
      </ConfirmDialog>
    </section>
  );
}

/** Notes of one rate: a text area committed when focus leaves. */
function NotesEditor({ rate, readOnly, onCommit }: { rate: VitalRate; readOnly: boolean; onCommit: (notes: string | undefined) => void }) {
  const [draft, setDraft] = useState<string | null>(null);
  if (readOnly) return <p className="whitespace-pre-wrap text-ink/90">{rate.notes}</p>;
  const text = draft ?? rate.notes ?? "";
  const tooLong = text.length > MAX_NOTES_LENGTH;
  return (
    <div>
      <label className="block text-xs font-bold" htmlFor={`notes-${rate.id}`}>
        Notes on {rate.name}
      </label>
      <textarea
        id={`notes-${rate.id}`}
        rows={3}
        value={text}
        aria-invalid={tooLong || undefined}
        onChange={(e) => setDraft(e.target.value)}
        onBlur={() => {
          if (draft === null || tooLong) return;
          if (draft !== (rate.notes ?? "")) onCommit(draft.trim() === "" ? undefined : draft);
          setDraft(null);
        }}
        className={`mt-1 block w-full max-w-3xl rounded border bg-white px-2 py-1 ${tooLong ? "border-2 border-brick" : "border-ink/35"}`}
      />
      {tooLong && <p className="text-xs font-bold text-brick">Notes have at most {MAX_NOTES_LENGTH} characters.</p>}
    </div>
  );
}

/** Names formulas use that no rate has, with the arrows concerned. */
function unknownRateNames(doc: LifeCycle): { name: string; arrows: Transition[] }[] {
  const known = doc.rates.map((r) => r.name);
  const found = new Map<string, Transition[]>();
  for (const t of doc.transitions) {
    if (typeof t.rate !== "string") continue;
    const check = checkFormula(t.rate, known);
    if (check.ok) continue;
    for (const e of check.errors) {
      if (e.code !== "unknown-rate" || e.name === undefined) continue;
      const list = found.get(e.name) ?? [];
      if (!list.includes(t)) list.push(t);
      found.set(e.name, list);
    }
  }
  return [...found].map(([name, arrows]) => ({ name, arrows }));
}

const THERMAL_FORM_NAMES = { arrhenius: "Boltzmann–Arrhenius", schoolfield: "Sharpe–Schoolfield", "gaussian-quadratic": "Gaussian–quadratic", briere: "Brière" } as const;

/** The way from a rate to its temperature response on the Climate tab. */
function ThermalLink({ rate, readOnly }: { rate: VitalRate; readOnly: boolean }) {
  const [, setSearch] = useSearchParams();
  if (readOnly && !rate.thermal) return null;
  const open = () =>
    setSearch(
      (params) => {
        const next = new URLSearchParams(params);
        next.set("tab", "climate");
        next.set("rate", rate.id);
        return next;
      },
      { replace: true },
    );
  return (
    <button type="button" className="mt-1 block text-xs font-bold text-indigo underline-offset-2 hover:underline" onClick={open}>
      {rate.thermal
        ? `Temperature: ${THERMAL_FORM_NAMES[rate.thermal.form]}${rate.thermal.appliesTo === "hazard" ? " on a hazard" : ""} →`
        : `Add a temperature response to ${rate.name} →`}
    </button>
  );
}
