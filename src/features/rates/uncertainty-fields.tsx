/**
 * The rest of a rate's uncertainty beside its SE and CI: the rate's scale
 * (which decides the distribution draws follow), counts k of n behind a
 * probability, or an explicit distribution; and the problems the
 * uncertainty has, each naming the rate. Each group is edited as a draft and
 * committed when focus leaves it, like the CI.
 */
import { useState, type ReactNode } from "react";
import { RATE_SCALES, rateScale, type RateDistribution, type VitalRate } from "../../../shared/lifecycle";
import type { UncertaintyIssue } from "../../../shared/uncertainty";
import { parseNumberInput } from "./rate-checks";

type Update = Partial<Omit<VitalRate, "id">>;

const SCALE_WORDS: Record<(typeof RATE_SCALES)[number], string> = {
  probability: "probability (0 to 1)",
  "non-negative": "non-negative",
  unbounded: "any sign",
};

/** Fields committed together when focus leaves the group; Enter commits, Escape drops the draft. */
function FieldGroup<K extends string>({
  label,
  initial,
  read,
  children,
}: {
  label: string;
  initial: Record<K, string>;
  read: (draft: Record<K, string>) => { error: string; field: K } | { ok: true; changed: boolean; commit: () => void };
  children: (field: (key: K, aria: string, width: string, placeholder?: string) => ReactNode, error: { error: string; field: K } | null) => ReactNode;
}) {
  const [draft, setDraft] = useState<Record<K, string> | null>(null);
  const shown = draft ?? initial;
  const result = draft === null ? null : read(draft);
  const error = result && "error" in result ? result : null;
  const field = (key: K, aria: string, width: string, placeholder = "—") => (
    <input
      aria-label={aria}
      aria-invalid={error?.field === key || undefined}
      inputMode="decimal"
      value={shown[key]}
      placeholder={placeholder}
      onChange={(e) => setDraft({ ...shown, [key]: e.target.value })}
      onKeyDown={(e) => {
        if (e.key === "Enter") {
          e.preventDefault();
          (e.target as HTMLInputElement).blur();
        } else if (e.key === "Escape") setDraft(null);
      }}
      className={`${width} rounded border bg-white px-1.5 py-1 tabular-nums ${error?.field === key ? "border-2 border-brick" : "border-ink/35"}`}
    />
  );
  return (
    <div
      role="group"
      aria-label={label}
      onBlur={(e) => {
        if (e.currentTarget.contains(e.relatedTarget as Node | null) || draft === null) return;
        const r = read(draft);
        if ("error" in r) return;
        if (r.changed) r.commit();
        setDraft(null);
      }}
    >
      {children(field, error)}
      {error && (
        <p className="mt-1 text-xs font-bold text-brick">
          <span aria-hidden="true">✕ </span>
          {error.error}
        </p>
      )}
    </div>
  );
}

function CountsEditor({ rate, onChange }: { rate: VitalRate; onChange: (update: Update, label: string) => void }) {
  const initial = { k: rate.counts ? String(rate.counts.k) : "", n: rate.counts ? String(rate.counts.n) : "" };
  return (
    <FieldGroup
      label={`Counts behind ${rate.name}`}
      initial={initial}
      read={(d) => {
        const commit = (counts: VitalRate["counts"]) => () => onChange({ counts }, counts ? `Set the counts of ${rate.name} to ${counts.k} of ${counts.n}` : `Remove the counts of ${rate.name}`);
        if (d.k.trim() === "" && d.n.trim() === "") return { ok: true, changed: rate.counts !== undefined, commit: commit(undefined) };
        const k = parseNumberInput(d.k);
        const n = parseNumberInput(d.n);
        if (k === null || !Number.isInteger(k) || k < 0) return { error: `k is a whole number of ${rate.name}'s individuals, 0 or more (or empty both).`, field: "k" };
        if (n === null || !Number.isInteger(n) || n < 1) return { error: "n is a whole number of individuals, at least 1.", field: "n" };
        if (k > n) return { error: `k (${k}) cannot exceed n (${n}): k of the n individuals at risk did it.`, field: "k" };
        return { ok: true, changed: rate.counts?.k !== k || rate.counts?.n !== n, commit: commit({ k, n }) };
      }}
    >
      {(field) => (
        <div className="flex items-center gap-1 text-xs">
          <span className="w-10 font-bold">Counts</span>
          {field("k", `k, individuals that did it, for ${rate.name}`, "w-14")}
          <span aria-hidden="true">of</span>
          {field("n", `n, individuals at risk, for ${rate.name}`, "w-14")}
        </div>
      )}
    </FieldGroup>
  );
}

const FAMILY_PARAMS = {
  beta: [
    ["alpha", "α"],
    ["beta", "β"],
  ],
  lognormal: [
    ["meanlog", "mean of log"],
    ["sdlog", "SD of log"],
  ],
  gamma: [
    ["shape", "shape"],
    ["rate", "rate"],
  ],
} as const;

type Family = keyof typeof FAMILY_PARAMS;

function DistributionEditor({ rate, onChange }: { rate: VitalRate; onChange: (update: Update, label: string) => void }) {
  const d = rate.distribution;
  const [family, setFamily] = useState<Family | "">(d?.family ?? "");
  const params = family === "" ? null : FAMILY_PARAMS[family];
  const value = (key: string) => (d && d.family === family ? String((d as Record<string, unknown>)[key]) : "");
  return (
    <div className="space-y-1">
      <label className="flex items-center gap-1 text-xs">
        <span className="w-10 font-bold">Law</span>
        <select
          aria-label={`Distribution of ${rate.name}`}
          value={family}
          onChange={(e) => {
            const next = e.target.value as Family | "";
            setFamily(next);
            if (next === "" && d) onChange({ distribution: undefined }, `Remove the distribution of ${rate.name}`);
          }}
          className="rounded border border-ink/35 bg-white px-1 py-1"
        >
          <option value="">none (from SE, CI or counts)</option>
          <option value="beta">beta (probabilities)</option>
          <option value="lognormal">lognormal (positive rates)</option>
          <option value="gamma">gamma (positive rates)</option>
        </select>
      </label>
      {params && family !== "" && (
        <FieldGroup
          key={family}
          label={`Parameters of the ${family} distribution of ${rate.name}`}
          initial={{ p0: value(params[0][0]), p1: value(params[1][0]) }}
          read={(draft) => {
            const a = parseNumberInput(draft.p0);
            const b = parseNumberInput(draft.p1);
            if (a === null || (family !== "lognormal" && a <= 0)) return { error: `Give ${params[0][1]} as a number${family !== "lognormal" ? " above 0" : ""}.`, field: "p0" };
            if (b === null || b <= 0) return { error: `Give ${params[1][1]} as a number above 0.`, field: "p1" };
            const next = { family, [params[0][0]]: a, [params[1][0]]: b } as RateDistribution;
            return { ok: true, changed: JSON.stringify(next) !== JSON.stringify(d), commit: () => onChange({ distribution: next }, `Set the ${family} distribution of ${rate.name}`) };
          }}
        >
          {(field) => (
            <div className="flex flex-wrap items-center gap-1 pl-11 text-xs">
              <span>{params[0][1]}</span>
              {field("p0", `${params[0][1]} of ${rate.name}`, "w-14")}
              <span>{params[1][1]}</span>
              {field("p1", `${params[1][1]} of ${rate.name}`, "w-14")}
            </div>
          )}
        </FieldGroup>
      )}
    </div>
  );
}

/** Scale, counts and distribution of one rate (editors), with its uncertainty problems. */
export function MoreUncertainty({ rate, issues, readOnly, onChange }: { rate: VitalRate; issues: readonly UncertaintyIssue[]; readOnly: boolean; onChange: (update: Update, label: string) => void }) {
  const hasMore = rate.counts !== undefined || rate.distribution !== undefined;
  const [open, setOpen] = useState(hasMore);
  return (
    <div className="space-y-1.5">
      {readOnly ? (
        <>
          {rate.counts && (
            <p className="text-xs">
              Counts: {rate.counts.k} of {rate.counts.n}
            </p>
          )}
          {rate.distribution && <p className="text-xs">Distribution: {describeDistribution(rate.distribution)}</p>}
        </>
      ) : (
        <>
          <label className="flex items-center gap-1 text-xs">
            <span className="w-10 font-bold">Scale</span>
            <select
              aria-label={`Scale of ${rate.name}`}
              value={rate.scale ?? ""}
              onChange={(e) => {
                const next = e.target.value === "" ? undefined : (e.target.value as VitalRate["scale"]);
                onChange({ scale: next }, next ? `Set the scale of ${rate.name} to ${next}` : `Let the value set the scale of ${rate.name}`);
              }}
              className="rounded border border-ink/35 bg-white px-1 py-1"
            >
              <option value="">{`from the value: ${SCALE_WORDS[rateScale({ value: rate.value })]}`}</option>
              {RATE_SCALES.map((s) => (
                <option key={s} value={s}>
                  {SCALE_WORDS[s]}
                </option>
              ))}
            </select>
          </label>
          {open ? (
            <>
              <CountsEditor rate={rate} onChange={onChange} />
              <DistributionEditor rate={rate} onChange={onChange} />
            </>
          ) : (
            <button type="button" className="text-xs font-bold text-indigo underline-offset-2 hover:underline" aria-expanded={false} onClick={() => setOpen(true)}>
              Counts or a distribution…
            </button>
          )}
        </>
      )}
      {issues.map((issue, k) => (
        <p key={k} className="max-w-xs text-xs" data-uncertainty-issue={issue.severity}>
          <span aria-hidden="true" className={`font-bold ${issue.severity === "error" ? "text-brick" : "text-ochre"}`}>
            {issue.severity === "error" ? "✕ " : "! "}
          </span>
          {issue.message}
        </p>
      ))}
    </div>
  );
}

export function describeDistribution(d: RateDistribution): string {
  switch (d.family) {
    case "beta":
      return `beta(α = ${d.alpha}, β = ${d.beta})`;
    case "lognormal":
      return `lognormal(mean of log ${d.meanlog}, SD of log ${d.sdlog})`;
    case "gamma":
      return `gamma(shape ${d.shape}, rate ${d.rate})`;
  }
}
