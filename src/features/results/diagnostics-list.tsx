import type { Diagnostic } from "../../../shared/demography";
import type { Selection } from "../../lib/editor-types";

const SEVERITY = {
  error: { mark: "✕", word: "Problem", colour: "text-brick", border: "border-brick" },
  warning: { mark: "!", word: "Warning", colour: "text-ochre", border: "border-ochre" },
  info: { mark: "i", word: "Note", colour: "text-indigo", border: "border-indigo" },
} as const;

/** The checks of the model in plain words; each stage at fault is a button that shows it in the diagram. */
export function DiagnosticsList({
  diagnostics,
  stageIds,
  stageNames,
  onSelect,
}: {
  diagnostics: readonly Diagnostic[];
  stageIds: readonly string[];
  stageNames: readonly string[];
  onSelect: (selection: Selection | null) => void;
}) {
  if (diagnostics.length === 0) {
    return (
      <p className="flex items-center gap-2 text-sm">
        <span aria-hidden="true" className="font-bold text-spruce">
          ✓
        </span>
        No problems found: survival out of every stage is at most 1, every stage can reach every other, and the structure settles to a stable distribution.
      </p>
    );
  }
  const order = { error: 0, warning: 1, info: 2 } as const;
  const sorted = [...diagnostics].sort((a, b) => order[a.severity] - order[b.severity]);
  return (
    <ul className="space-y-2">
      {sorted.map((d, k) => {
        const s = SEVERITY[d.severity];
        return (
          <li key={`${d.code}-${k}`} className={`rounded-md border-l-4 bg-white px-3 py-2 ${s.border}`}>
            <p className="text-sm">
              <span aria-hidden="true" className={`mr-1 font-bold ${s.colour}`}>
                {s.mark}
              </span>
              <span className="font-bold">{s.word}: </span>
              {d.message}
            </p>
            {d.stages.length > 0 && (
              <p className="mt-1 flex flex-wrap items-center gap-2 text-xs">
                <span>Show in the diagram:</span>
                {d.stages.map((index) => {
                  const id = stageIds[index];
                  if (id === undefined) return null;
                  return (
                    <button
                      key={id}
                      type="button"
                      onClick={() => onSelect({ kind: "stage", id })}
                      className="rounded-full border border-indigo/50 px-2 py-0.5 font-bold text-indigo hover:bg-indigo/10"
                    >
                      {stageNames[index] ?? id}
                    </button>
                  );
                })}
              </p>
            )}
          </li>
        );
      })}
    </ul>
  );
}
