import type { LifeCycleRecord } from "../../../shared/schemas/life-cycles";

export interface HistoryPanelProps {
  lifeCycleId: string;
  /** The life cycle's version the editor has loaded (restore sends it; a stale one is refused). */
  version: number;
  readOnly: boolean;
  /** Called with the restored life cycle after a successful restore. */
  onRestored: (record: LifeCycleRecord) => void;
}

/** Snapshots of the life cycle (first cut: placeholder). */
export function HistoryPanel(_props: HistoryPanelProps) {
  return (
    <section aria-labelledby="history-heading" className="space-y-3">
      <h2 id="history-heading" className="text-xl font-bold">History</h2>
      <p className="text-ink/75">Snapshots will be listed here.</p>
    </section>
  );
}
