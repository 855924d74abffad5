import type { ReactNode } from "react";

/** One number with its name, unit and a short plain-language explanation beside it. */
export function Figure({ label, value, unit, help, why }: { label: ReactNode; value: ReactNode; unit?: ReactNode; help: ReactNode; why?: string | null | undefined }) {
  return (
    <div className="rounded-md border border-ink/15 bg-white p-3">
      <dt className="text-sm font-bold">{label}</dt>
      <dd className="mt-1">
        <span className="text-2xl font-bold tabular-nums" data-figure>
          {value}
        </span>
        {unit && <span className="ml-1 text-sm text-ink/80">{unit}</span>}
        {why && <p className="mt-1 text-sm text-ink/85">{why}</p>}
        <p className="mt-1 text-xs text-ink/75">{help}</p>
      </dd>
    </div>
  );
}
