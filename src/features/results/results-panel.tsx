import type { EditorPanelProps } from "../../lib/editor-types";

/** The analysis of the life cycle (first cut: λ only). */
export function ResultsPanel({ analysis }: EditorPanelProps) {
  return (
    <section aria-labelledby="results-heading" className="space-y-3">
      <h2 id="results-heading" className="text-xl font-bold">Results</h2>
      {analysis.data ? <p>λ = {analysis.data.lambda.toFixed(4)}</p> : <p className="text-ink/75">No result yet.</p>}
    </section>
  );
}
