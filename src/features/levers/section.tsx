import type { ReactNode } from "react";
import { Loading } from "../../components/ui/spinner";

/** One part of the Levers tab: a heading, a short plain-language explanation, its content. */
export function Section({ id, title, help, children }: { id: string; title: string; help?: ReactNode; children: ReactNode }) {
  return (
    <section aria-labelledby={id} className="space-y-3 border-t border-ink/15 pt-5">
      <div>
        <h3 id={id} className="text-lg font-bold">
          {title}
        </h3>
        {help && <div className="max-w-3xl space-y-1 text-sm text-ink/85">{help}</div>}
      </div>
      {children}
    </section>
  );
}

export function ChartFallback() {
  return <Loading label="Drawing the chart…" />;
}
