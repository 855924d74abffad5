/**
 * Review: comment threads anchored to the model and the reviews of its
 * snapshots. Comments are written by reviewers, editors and owners; viewers
 * read. A thread's "Show" button selects its anchor in the editor.
 */
import { useMemo, useState } from "react";
import type { LifeCycle } from "../../../shared/lifecycle";
import type { CommentAnchor } from "../../../shared/schemas/review";
import type { Role } from "../../../shared/schemas/studies";
import { roleAtLeast } from "../../../shared/schemas/studies";
import { useCommentAction, useComments } from "../../api/comments";
import { useMembers } from "../../api/members";
import { useCurrentUser } from "../../api/session";
import { useSnapshots } from "../../api/snapshots";
import { Alert } from "../../components/ui/alert";
import { SelectField } from "../../components/ui/field";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import type { Selection } from "../../lib/editor-types";
import { anchorSelection, describeSelection, selectionAnchor } from "./anchors";
import { CommentForm } from "./comment-form";
import { CommentThreadCard, type ThreadActions } from "./comment-thread";
import { ReviewsSection } from "./reviews-section";

export interface ReviewPanelProps {
  lifeCycleId: string;
  studyId: string;
  role: Role;
  document: LifeCycle;
  /** What is selected in the editor: a new comment can be anchored to it. */
  selection: Selection | null;
  /** Select a thread's anchor in the editor (and show its tab). */
  onShowAnchor: (anchor: CommentAnchor) => void;
  /** A thread or snapshot named by the page address (links in e-mails). */
  focusThreadId: string | null;
  focusSnapshotId: string | null;
  onShowChanges: (snapshotId: string) => void;
}

type Show = "open" | "resolved" | "all";

export function ReviewPanel(props: ReviewPanelProps) {
  const { lifeCycleId, studyId, role, document, selection, onShowAnchor, focusThreadId } = props;
  const threads = useComments(lifeCycleId);
  const members = useMembers(studyId);
  const snapshots = useSnapshots(lifeCycleId);
  const me = useCurrentUser();
  const action = useCommentAction(lifeCycleId, studyId);
  const [show, setShow] = useState<Show>("open");
  const [target, setTarget] = useState<string>("selection");
  const canComment = roleAtLeast(role, "reviewer");
  const memberRefs = useMemo(() => (members.data ?? []).map((m) => ({ userId: m.userId, name: m.name, role: m.role })), [members.data]);
  const selectionLabel = selection ? describeSelection(document, selection) : null;
  // "The selection" until something is selected means the life cycle as a whole.
  const effectiveTarget = target === "selection" && !selectionLabel ? "lifeCycle" : target;

  const anchorFor = (choice: string): CommentAnchor => {
    if (choice === "selection" && selection && selectionLabel) return selectionAnchor(selection);
    if (choice.startsWith("snapshot:")) return { kind: "snapshot", snapshotId: choice.slice("snapshot:".length) };
    for (const kind of ["stage", "transition", "rate"] as const) {
      if (choice.startsWith(`${kind}:`)) return { kind, id: choice.slice(kind.length + 1) };
    }
    return { kind: "lifeCycle" };
  };

  const actions: ThreadActions = {
    reply: (commentId, body, mentions) => action.mutateAsync({ kind: "reply", commentId, body: { body, mentions } }),
    edit: (commentId, body, mentions) => action.mutateAsync({ kind: "edit", commentId, body: { body, mentions } }),
    remove: (commentId) => action.mutateAsync({ kind: "delete", commentId }).catch(() => undefined),
    setResolved: (commentId, resolved) => action.mutateAsync({ kind: resolved ? "resolve" : "reopen", commentId }).catch(() => undefined),
  };

  const all = threads.data ?? [];
  // A thread an e-mail pointed at is shown even when it is resolved.
  const visible = all.filter((t) => t.id === focusThreadId || show === "all" || (show === "open" ? !t.resolvedAt : !!t.resolvedAt));
  const openCount = all.filter((t) => !t.resolvedAt).length;

  return (
    <div className="grid gap-6 xl:grid-cols-[minmax(0,3fr)_minmax(0,2fr)]">
      <section aria-labelledby="comments-heading" className="min-w-0 space-y-4">
        <div className="flex flex-wrap items-end justify-between gap-3">
          <div>
            <h2 id="comments-heading" className="text-xl font-bold">
              Comments
            </h2>
            <p className="text-sm text-ink/75">
              {openCount} open {openCount === 1 ? "thread" : "threads"}, {all.length - openCount} resolved. Threads on stages, arrows and matrix entries are marked on the Diagram and the Matrix.
            </p>
          </div>
          <SelectField label="Show" value={show} onChange={(e) => setShow(e.target.value as Show)} fieldClassName="w-48">
            <option value="open">Open threads</option>
            <option value="resolved">Resolved threads</option>
            <option value="all">All threads</option>
          </SelectField>
        </div>

        {action.isError && !action.isPending && (
          <Alert tone="error" title="That did not work">
            {action.error.message}
          </Alert>
        )}

        {canComment ? (
          <div className="space-y-3 rounded-lg border border-ink/15 bg-white p-4 shadow-sm">
            <h3 className="font-bold">New thread</h3>
            <SelectField label="About" value={effectiveTarget} onChange={(e) => setTarget(e.target.value)} description="Pick it here, or select a stage or arrow on the Diagram or an entry in the Matrix first: the selection is offered at the top.">
              <option value="selection" disabled={!selectionLabel}>
                {selectionLabel ? `The selection: ${selectionLabel}` : "The selection (nothing selected)"}
              </option>
              <option value="lifeCycle">The life cycle as a whole</option>
              <optgroup label="Stages">
                {document.stages.map((st) => (
                  <option key={st.id} value={`stage:${st.id}`}>
                    {describeSelection(document, { kind: "stage", id: st.id })}
                  </option>
                ))}
              </optgroup>
              <optgroup label="Arrows">
                {document.transitions.map((t) => (
                  <option key={t.id} value={`transition:${t.id}`}>
                    {describeSelection(document, { kind: "transition", id: t.id })}
                  </option>
                ))}
              </optgroup>
              <optgroup label="Vital rates">
                {document.rates.map((r) => (
                  <option key={r.id} value={`rate:${r.id}`}>
                    {describeSelection(document, { kind: "rate", id: r.id })}
                  </option>
                ))}
              </optgroup>
              <optgroup label="Snapshots">
                {(snapshots.data ?? []).map((s) => (
                  <option key={s.id} value={`snapshot:${s.id}`}>
                    Snapshot #{s.number} ({s.message})
                  </option>
                ))}
              </optgroup>
            </SelectField>
            <CommentForm
              label="Comment"
              submitLabel="Comment"
              members={memberRefs}
              selfId={me?.id ?? null}
              onSubmit={(body, mentions) =>
                action.mutateAsync({ kind: "create", body: { anchor: anchorFor(effectiveTarget), body, mentions } })
              }
            />
          </div>
        ) : (
          <p className="rounded-md border border-dashed border-ink/30 p-3 text-sm">You can read the comments; commenting needs the reviewer role or above.</p>
        )}

        {threads.isPending ? (
          <Loading label="Loading comments…" />
        ) : threads.isError ? (
          <QueryError error={threads.error} what="the comments" onRetry={() => threads.refetch()} />
        ) : visible.length === 0 ? (
          <p className="text-ink/75">{show === "open" ? "No open threads." : show === "resolved" ? "No resolved threads." : "No comments yet."}</p>
        ) : (
          <ol className="space-y-3" aria-label="Comment threads">
            {visible.map((t) => {
              const sel = anchorSelection(t.anchor);
              return (
                <li key={t.id}>
                  <CommentThreadCard
                    thread={t}
                    currentLabel={sel ? describeSelection(document, sel) : t.anchorLabel}
                    canComment={canComment}
                    isOwner={role === "owner"}
                    selfId={me?.id ?? null}
                    members={memberRefs}
                    focused={t.id === focusThreadId}
                    actions={actions}
                    onShowAnchor={onShowAnchor}
                  />
                </li>
              );
            })}
          </ol>
        )}
      </section>
      <div className="min-w-0">
        <ReviewsSection
          lifeCycleId={lifeCycleId}
          studyId={studyId}
          role={role}
          selfId={me?.id ?? null}
          snapshots={snapshots.data ?? []}
          members={memberRefs}
          focusSnapshotId={props.focusSnapshotId}
          onShowChanges={props.onShowChanges}
        />
      </div>
    </div>
  );
}
