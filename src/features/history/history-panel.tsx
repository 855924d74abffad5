/**
 * History: the numbered snapshots of a life cycle, taking one, comparing two
 * (or one with the current saved state) and restoring one. Restoring makes
 * the snapshot the current state and records that as a new snapshot, so
 * history only grows.
 */
import { useMemo, useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import { MAX_SNAPSHOT_MESSAGE_LENGTH, type LifeCycleRecord } from "../../../shared/schemas/life-cycles";
import { isApiError } from "../../api/client";
import { useLifeCycle } from "../../api/life-cycles";
import { type SnapshotSummary, useCreateSnapshot, useRestoreSnapshot, useSnapshot, useSnapshots } from "../../api/snapshots";
import { Alert } from "../../components/ui/alert";
import { Button } from "../../components/ui/button";
import { ConfirmDialog } from "../../components/ui/dialog";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { RelativeTime } from "../../components/ui/time";
import { formatDateTime } from "../../lib/format";
import { DiffView } from "./diff-view";
import { diffLifeCycles } from "./snapshot-diff";

export interface HistoryPanelProps {
  lifeCycleId: string;
  /** The life cycle's version the editor has loaded (restore sends it; a stale one is refused). */
  version: number;
  readOnly: boolean;
  /** Called with the restored life cycle after a successful restore. */
  onRestored: (record: LifeCycleRecord) => void;
  /** Open with this snapshot compared to the current state ("changed since approval"). */
  compareWith?: string | null;
}

/** "current" or a snapshot id. */
type Side = string;
const CURRENT = "current";

const snapshotLabel = (s: SnapshotSummary) => `#${s.number} ${s.message}`;

export function HistoryPanel({ lifeCycleId, version, readOnly, onRestored, compareWith }: HistoryPanelProps) {
  const snapshots = useSnapshots(lifeCycleId);
  const [message, setMessage] = useState("");
  const create = useCreateSnapshot(lifeCycleId);
  const restore = useRestoreSnapshot(lifeCycleId);
  const [restoring, setRestoring] = useState<SnapshotSummary | null>(null);
  const [compare, setCompare] = useState<{ before: Side; after: Side } | null>(compareWith ? { before: compareWith, after: CURRENT } : null);
  const [notice, setNotice] = useState("");

  const trimmed = message.trim();
  const messageError = trimmed.length > MAX_SNAPSHOT_MESSAGE_LENGTH ? `A message has at most ${MAX_SNAPSHOT_MESSAGE_LENGTH} characters.` : null;

  function takeSnapshot() {
    if (trimmed === "" || messageError) return;
    create.mutate(trimmed, {
      onSuccess: (s) => {
        setMessage("");
        setNotice(`Took snapshot #${s.number}.`);
      },
    });
  }

  function confirmRestore() {
    if (!restoring) return;
    const target = restoring;
    restore.mutate(
      { snapshotId: target.id, version },
      {
        onSuccess: (result) => {
          setRestoring(null);
          setNotice(`Restored snapshot #${target.number}; it is now the current state (recorded as snapshot #${result.snapshot.number}).`);
          onRestored(result.lifeCycle);
        },
      },
    );
  }

  const list = snapshots.data ?? [];
  const restoreError = restore.error
    ? isApiError(restore.error) && restore.error.status === 409
      ? "The life cycle was saved since you opened it (perhaps by your own autosave, or by someone else). Wait a moment for the editor to catch up, then try again."
      : restore.error.message
    : null;

  return (
    <section aria-labelledby="history-heading" className="space-y-4">
      <div className="space-y-1">
        <h2 id="history-heading" className="text-xl font-bold">
          History
        </h2>
        <p className="max-w-3xl text-sm text-ink/80">
          A snapshot is a saved state of this life cycle that never changes. Compare two snapshots, or one with the current state, to see what changed.
          {!readOnly && " Restoring a snapshot makes it the current state and records that as a new snapshot, so nothing is lost."}
        </p>
      </div>

      {!readOnly && (
        <form
          className="flex flex-wrap items-end gap-3 rounded-md border border-ink/15 bg-white p-3"
          onSubmit={(e) => {
            e.preventDefault();
            takeSnapshot();
          }}
        >
          <label className="min-w-72 flex-1 space-y-1">
            <span className="block text-sm font-bold">What this snapshot is</span>
            <input
              value={message}
              onChange={(e) => setMessage(e.target.value)}
              placeholder="e.g. rates from the 2026 survey"
              aria-invalid={messageError ? true : undefined}
              aria-describedby="snapshot-message-help"
              className={`block w-full rounded border bg-white px-3 py-2 ${messageError ? "border-2 border-brick" : "border-ink/40"}`}
            />
            <span id="snapshot-message-help" className="block text-xs text-ink/75">
              {messageError ?? `The snapshot records the last saved state (version ${version}).`}
            </span>
          </label>
          <Button type="submit" pending={create.isPending} disabled={trimmed === "" || messageError !== null}>
            Take snapshot
          </Button>
          {create.isError && (
            <Alert tone="error" className="w-full">
              The snapshot was not taken: {create.error.message}
            </Alert>
          )}
        </form>
      )}

      <p role="status" className="min-h-5 text-sm">
        {notice}
      </p>

      {snapshots.isPending ? (
        <Loading label="Loading snapshots…" />
      ) : snapshots.isError ? (
        <QueryError error={snapshots.error} what="the snapshots" onRetry={() => snapshots.refetch()} />
      ) : list.length === 0 ? (
        <p className="rounded-md border border-dashed border-ink/30 p-4 text-ink/80">No snapshots yet.{!readOnly && " Take one before a big change, so you can compare and go back."}</p>
      ) : (
        <>
          <CompareForm snapshots={list} value={compare} onCompare={setCompare} />
          <div className="overflow-x-auto">
            <table className="w-full border-collapse text-left text-sm">
              <caption className="sr-only">Snapshots, newest first</caption>
              <thead>
                <tr className="border-b-2 border-ink/20">
                  <th scope="col" className="px-2 py-2">#</th>
                  <th scope="col" className="px-2 py-2">Message</th>
                  <th scope="col" className="px-2 py-2">Author</th>
                  <th scope="col" className="px-2 py-2">Taken</th>
                  <th scope="col" className="px-2 py-2">
                    <span className="sr-only">Actions</span>
                  </th>
                </tr>
              </thead>
              <tbody>
                {list.map((s) => (
                  <tr key={s.id} className="border-b border-ink/10 align-top">
                    <td className="px-2 py-2 font-bold tabular-nums">{s.number}</td>
                    <td className="px-2 py-2 break-words">{s.message}</td>
                    <td className="px-2 py-2">{s.authorName ?? <span className="text-ink/70">former member</span>}</td>
                    <td className="px-2 py-2 whitespace-nowrap">
                      <RelativeTime iso={s.createdAt} />
                      <span className="block text-xs text-ink/70">{formatDateTime(s.createdAt)}</span>
                    </td>
                    <td className="px-2 py-2">
                      <span className="flex flex-wrap justify-end gap-2">
                        <Button size="sm" variant="secondary" onClick={() => setCompare({ before: s.id, after: CURRENT })} aria-label={`Compare snapshot #${s.number} with the current state`}>
                          Compare with current
                        </Button>
                        {!readOnly && (
                          <Button
                            size="sm"
                            variant="secondary"
                            onClick={() => {
                              restore.reset();
                              setRestoring(s);
                            }}
                            aria-label={`Restore snapshot #${s.number}`}
                          >
                            Restore
                          </Button>
                        )}
                      </span>
                    </td>
                  </tr>
                ))}
              </tbody>
            </table>
          </div>
          {compare && <Comparison lifeCycleId={lifeCycleId} version={version} snapshots={list} before={compare.before} after={compare.after} />}
        </>
      )}

      <ConfirmDialog
        open={restoring !== null}
        onClose={() => setRestoring(null)}
        onConfirm={confirmRestore}
        title={restoring ? `Restore snapshot #${restoring.number}?` : "Restore snapshot?"}
        confirmLabel="Restore this snapshot"
        pending={restore.isPending}
        error={restoreError}
        tone="primary"
      >
        {restoring && (
          <div className="space-y-2">
            <p>
              “{restoring.message}”, taken {formatDateTime(restoring.createdAt)}
              {restoring.authorName ? ` by ${restoring.authorName}` : ""}, becomes the current state of the life cycle for everyone.
            </p>
            <p>The current state is replaced. If it is not in a snapshot yet, take one first so you can come back to it.</p>
          </div>
        )}
      </ConfirmDialog>
    </section>
  );
}

function CompareForm({ snapshots, value, onCompare }: { snapshots: SnapshotSummary[]; value: { before: Side; after: Side } | null; onCompare: (v: { before: Side; after: Side }) => void }) {
  const [before, setBefore] = useState<Side>(value?.before ?? snapshots[1]?.id ?? snapshots[0]!.id);
  const [after, setAfter] = useState<Side>(value?.after ?? (snapshots.length > 1 ? snapshots[0]!.id : CURRENT));
  const options = (
    <>
      <option value={CURRENT}>Current state</option>
      {snapshots.map((s) => (
        <option key={s.id} value={s.id}>
          {snapshotLabel(s)}
        </option>
      ))}
    </>
  );
  return (
    <form
      className="flex flex-wrap items-end gap-3"
      onSubmit={(e) => {
        e.preventDefault();
        onCompare({ before, after });
      }}
    >
      <label className="space-y-1 text-sm">
        <span className="block font-bold">Compare</span>
        <select value={before} onChange={(e) => setBefore(e.target.value)} className="max-w-72 rounded border border-ink/40 bg-white px-2 py-1.5">
          {options}
        </select>
      </label>
      <label className="space-y-1 text-sm">
        <span className="block font-bold">with</span>
        <select value={after} onChange={(e) => setAfter(e.target.value)} className="max-w-72 rounded border border-ink/40 bg-white px-2 py-1.5">
          {options}
        </select>
      </label>
      <Button type="submit" variant="secondary" disabled={before === after}>
        Show changes
      </Button>
    </form>
  );
}

/** Loads both sides (a snapshot, or the current saved state) and shows their diff. */
function Comparison({ lifeCycleId, version, snapshots, before, after }: { lifeCycleId: string; version: number; snapshots: SnapshotSummary[]; before: Side; after: Side }) {
  const current = useLifeCycle(lifeCycleId);
  const a = useSnapshot(before === CURRENT ? null : before);
  const b = useSnapshot(after === CURRENT ? null : after);
  const side = (id: Side, q: typeof a): { doc: LifeCycle | undefined; error: unknown } =>
    id === CURRENT ? { doc: current.data?.document, error: current.error } : { doc: q.data?.document, error: q.error };
  const left = side(before, a);
  const right = side(after, b);
  const diff = useMemo(() => (left.doc && right.doc ? diffLifeCycles(left.doc, right.doc) : null), [left.doc, right.doc]);
  const label = (id: Side) => {
    if (id === CURRENT) return `the current state (version ${current.data?.version ?? version})`;
    const s = snapshots.find((x) => x.id === id);
    return s ? `snapshot #${s.number}` : "a snapshot";
  };
  const error = left.error ?? right.error;
  if (error) return <QueryError error={error} what="the states to compare" />;
  if (!diff) return <Loading label="Loading the states to compare…" />;
  return <DiffView diff={diff} beforeLabel={label(before)} afterLabel={label(after)} />;
}
