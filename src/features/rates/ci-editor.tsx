import { useState } from "react";
import type { ConfidenceInterval } from "../../../shared/lifecycle";
import { parseNumberInput } from "./rate-checks";

type Draft = { lower: string; upper: string; level: string };

const fromCi = (ci: ConfidenceInterval | undefined): Draft =>
  ci === undefined ? { lower: "", upper: "", level: "95" } : { lower: String(ci.lower), upper: String(ci.upper), level: String(Number((ci.level * 100).toPrecision(12))) };

/** What the three fields say: a CI, no CI (all bounds empty), or a problem. */
function read(d: Draft): { ci: ConfidenceInterval | undefined } | { error: string; field: keyof Draft } {
  if (d.lower.trim() === "" && d.upper.trim() === "") return { ci: undefined };
  const lower = parseNumberInput(d.lower);
  const upper = parseNumberInput(d.upper);
  const level = parseNumberInput(d.level);
  if (lower === null) return { error: "Give the lower bound as a number (or empty both bounds).", field: "lower" };
  if (upper === null) return { error: "Give the upper bound as a number (or empty both bounds).", field: "upper" };
  if (upper < lower) return { error: "The upper bound is below the lower bound.", field: "upper" };
  if (level === null || level <= 0 || level >= 100) return { error: "The level is a percentage between 0 and 100, e.g. 95.", field: "level" };
  return { ci: { lower, upper, level: level / 100 } };
}

/** A confidence interval edited as three fields and committed as one, when focus leaves the group. */
export function CiEditor({ rateName, value, ci, onCommit }: { rateName: string; value: number; ci: ConfidenceInterval | undefined; onCommit: (ci: ConfidenceInterval | undefined) => void }) {
  const [draft, setDraft] = useState<Draft | null>(null);
  const shown = draft ?? fromCi(ci);
  const result = draft === null ? null : read(draft);
  const error = result && "error" in result ? result : null;
  const outside = ci !== undefined && draft === null && (value < ci.lower || value > ci.upper);

  const field = (key: keyof Draft, label: string, width: string) => (
    <input
      aria-label={`${label} of ${rateName}`}
      aria-invalid={error?.field === key || undefined}
      inputMode="decimal"
      value={shown[key]}
      placeholder={key === "level" ? "95" : "—"}
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
      aria-label={`Confidence interval of ${rateName}`}
      onBlur={(e) => {
        if (e.currentTarget.contains(e.relatedTarget as Node | null) || draft === null) return;
        const r = read(draft);
        if ("error" in r) return;
        const same = JSON.stringify(r.ci) === JSON.stringify(ci);
        if (!same) onCommit(r.ci);
        setDraft(null);
      }}
    >
      <div className="flex items-center gap-1 text-xs">
        <span className="w-6 font-bold">CI</span>
        {field("lower", "Lower bound", "w-14")}
        <span aria-hidden="true">to</span>
        {field("upper", "Upper bound", "w-14")}
        <span aria-hidden="true">at</span>
        {field("level", "Confidence level (%)", "w-10")}
        <span aria-hidden="true">%</span>
      </div>
      {error && (
        <p className="mt-1 text-xs font-bold text-brick">
          <span aria-hidden="true">✕ </span>
          {error.error}
        </p>
      )}
      {outside && (
        <p className="mt-1 text-xs">
          <span aria-hidden="true" className="font-bold text-ochre">! </span>
          The value lies outside its confidence interval.
        </p>
      )}
    </div>
  );
}
