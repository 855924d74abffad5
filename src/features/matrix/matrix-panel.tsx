import { buildMatrices } from "../../../shared/lifecycle";
import type { EditorPanelProps } from "../../lib/editor-types";

/** The projection matrix built from the diagram (first cut: read-only). */
export function MatrixPanel({ document }: EditorPanelProps) {
  const m = buildMatrices(document);
  return (
    <section aria-labelledby="matrix-heading" className="space-y-3">
      <h2 id="matrix-heading" className="text-xl font-bold">Matrix</h2>
      <table className="text-sm">
        <thead>
          <tr>
            <th scope="col">to ↓ / from →</th>
            {m.stageNames.map((name, j) => (
              <th key={m.stageIds[j]} scope="col">{name}</th>
            ))}
          </tr>
        </thead>
        <tbody>
          {m.A.map((row, i) => (
            <tr key={m.stageIds[i]}>
              <th scope="row">{m.stageNames[i]}</th>
              {row.map((v, j) => (
                <td key={m.stageIds[j]} className="px-2 tabular-nums">{Number.isNaN(v) ? "?" : v}</td>
              ))}
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
