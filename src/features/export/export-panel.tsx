/**
 * Export: the life cycle as Stagewright's own JSON document, the matrices as
 * CSV and the results as CSV. Files are made in the browser from the
 * document and the analysis the editor already has. Text cells of the CSV
 * files are escaped against spreadsheet formulas (see lib/csv-export.ts).
 */
import { type ReactNode, useMemo, useState } from "react";
import { buildMatrices, type LifeCycle } from "../../../shared/lifecycle";
import { Button } from "../../components/ui/button";
import { fileStem, lifeCycleJson, matrixCsv, resultsCsv } from "../../lib/csv-export";
import { downloadText } from "../../lib/download";
import type { AnalysisState } from "../../lib/editor-types";

export interface ExportPanelProps {
  document: LifeCycle;
  analysis: AnalysisState;
}

function ExportRow({ title, description, children }: { title: string; description: ReactNode; children: ReactNode }) {
  return (
    <li className="flex flex-wrap items-start justify-between gap-3 border-b border-ink/10 py-3 last:border-b-0">
      <div className="max-w-2xl space-y-1">
        <h3 className="font-bold">{title}</h3>
        <div className="text-sm text-ink/80">{description}</div>
      </div>
      <div className="flex flex-wrap gap-2">{children}</div>
    </li>
  );
}

export function ExportPanel({ document: doc, analysis }: ExportPanelProps) {
  const stem = fileStem(doc.name);
  const [status, setStatus] = useState("");
  const matrices = useMemo(() => buildMatrices(doc), [doc]);
  const matrixProblem = doc.stages.length === 0 ? "The life cycle has no stages yet." : matrices.errors.length > 0 ? `Some rates cannot be computed: ${matrices.errors[0]!.message}` : null;

  const save = (filename: string, text: string, mime: string) => {
    downloadText(filename, text, mime);
    setStatus(`Saved ${filename}.`);
  };

  const results = analysis.data && !analysis.stale ? analysis.data : null;
  const resultsProblem = results
    ? null
    : analysis.error
      ? `The current model cannot be analysed: ${analysis.error.message}`
      : analysis.pending || analysis.stale
        ? "The results are being recomputed; try again in a moment."
        : "There are no results yet.";

  return (
    <section aria-labelledby="export-heading" className="space-y-3">
      <div className="space-y-1">
        <h2 id="export-heading" className="text-xl font-bold">
          Export
        </h2>
        <p className="text-sm text-ink/80">Files of “{doc.name}” as it is in the editor now, including changes not yet saved.</p>
      </div>
      <ul>
        <ExportRow
          title="Life cycle (JSON)"
          description={
            <>
              Stagewright’s own document, format version {doc.stagewright}: stages, vital rates with their uncertainty and sources, and arrows. Import it into any Study to get exactly this
              life cycle back.
            </>
          }
        >
          <Button onClick={() => save(`${stem}.stagewright.json`, lifeCycleJson(doc), "application/json")}>Download JSON</Button>
        </ExportRow>
        <ExportRow
          title="Matrix (CSV)"
          description={
            <>
              The projection matrix A with stage names on the first row (columns: stage at t) and first column (rows: stage at t+1); U (survival and growth) and F (reproduction)
              separately if you need them.
              {matrixProblem && <span className="mt-1 block font-bold text-brick">✕ {matrixProblem}</span>}
            </>
          }
        >
          <Button disabled={matrixProblem !== null} onClick={() => save(`${stem}-matrix-A.csv`, matrixCsv(matrices.A, matrices.stageNames), "text/csv")}>
            Download A
          </Button>
          <Button variant="secondary" disabled={matrixProblem !== null} onClick={() => save(`${stem}-matrix-U.csv`, matrixCsv(matrices.U, matrices.stageNames), "text/csv")}>
            Download U
          </Button>
          <Button variant="secondary" disabled={matrixProblem !== null} onClick={() => save(`${stem}-matrix-F.csv`, matrixCsv(matrices.F, matrices.stageNames), "text/csv")}>
            Download F
          </Button>
        </ExportRow>
        <ExportRow
          title="Results (CSV)"
          description={
            <>
              λ, damping ratio, R0 and generation times; w, v and life expectancy by stage; sensitivities S and elasticities E with stage names (rows: stage at t+1, columns: stage at
              t); vital-rate sensitivities. Numbers at full precision.
              {resultsProblem && <span className="mt-1 block font-bold">{resultsProblem}</span>}
            </>
          }
        >
          <Button disabled={results === null} onClick={() => results && save(`${stem}-results.csv`, resultsCsv(doc, results), "text/csv")}>
            Download results
          </Button>
        </ExportRow>
      </ul>
      <p role="status" className="min-h-5 text-sm text-ink/80">
        {status}
      </p>
    </section>
  );
}
