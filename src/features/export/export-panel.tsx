import type { LifeCycle } from "../../../shared/lifecycle";
import type { AnalysisState } from "../../lib/editor-types";

export interface ExportPanelProps {
  document: LifeCycle;
  analysis: AnalysisState;
}

/** Downloads of the life cycle (first cut: placeholder). */
export function ExportPanel({ document }: ExportPanelProps) {
  return (
    <section aria-labelledby="export-heading" className="space-y-3">
      <h2 id="export-heading" className="text-xl font-bold">Export</h2>
      <p className="text-ink/75">Downloads of “{document.name}” will be offered here.</p>
    </section>
  );
}
