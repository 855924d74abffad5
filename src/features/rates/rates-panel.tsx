import type { EditorPanelProps } from "../../lib/editor-types";

/** The named vital rates of the life cycle (first cut: a read-only list). */
export function RatesPanel({ document }: EditorPanelProps) {
  return (
    <section aria-labelledby="rates-heading" className="space-y-3">
      <h2 id="rates-heading" className="text-xl font-bold">Rates</h2>
      {document.rates.length === 0 ? (
        <p className="text-ink/75">No vital rates yet.</p>
      ) : (
        <ul>
          {document.rates.map((r) => (
            <li key={r.id}>
              <code>{r.name}</code> = {r.value}
            </li>
          ))}
        </ul>
      )}
    </section>
  );
}
