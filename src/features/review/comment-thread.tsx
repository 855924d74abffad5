import { useEffect, useRef, useState } from "react";
import type { CommentAnchor, CommentThread, CommentView } from "../../../shared/schemas/review";
import { Badge } from "../../components/ui/badge";
import { Button } from "../../components/ui/button";
import { RelativeTime } from "../../components/ui/time";
import { CommentBody } from "./comment-body";
import { CommentForm, type MemberRef } from "./comment-form";

export interface ThreadActions {
  reply: (commentId: string, body: string, mentions: string[]) => Promise<unknown>;
  edit: (commentId: string, body: string, mentions: string[]) => Promise<unknown>;
  remove: (commentId: string) => Promise<unknown>;
  setResolved: (commentId: string, resolved: boolean) => Promise<unknown>;
}

interface ThreadProps {
  thread: CommentThread;
  /** How the anchor reads now; null when it was removed from the life cycle. */
  currentLabel: string | null;
  canComment: boolean;
  isOwner: boolean;
  selfId: string | null;
  members: readonly MemberRef[];
  focused: boolean;
  actions: ThreadActions;
  onShowAnchor: (anchor: CommentAnchor) => void;
}

const SHOW_LABEL: Record<CommentAnchor["kind"], string | null> = {
  stage: "Show on the Diagram",
  transition: "Show on the Diagram",
  rate: "Show in Rates",
  cell: "Show in the Matrix",
  snapshot: "Show in History",
  lifeCycle: null,
};

function OneComment({ comment, thread, ...p }: { comment: CommentView; thread: CommentThread } & Omit<ThreadProps, "thread" | "focused" | "onShowAnchor" | "currentLabel">) {
  const [editing, setEditing] = useState(false);
  if (comment.deletedAt) {
    return <p className="text-sm text-ink/70 italic">This comment was deleted.</p>;
  }
  const mine = comment.authorId !== null && comment.authorId === p.selfId;
  return (
    <div className="space-y-1" data-comment-id={comment.id}>
      <p className="text-sm">
        <span className="font-bold">{comment.authorName ?? "A former member"}</span>{" "}
        <span className="text-ink/75">
          <RelativeTime iso={comment.createdAt} />
          {comment.editedAt && " · edited"}
        </span>
      </p>
      {editing ? (
        <CommentForm
          label="Edit your comment"
          submitLabel="Save"
          initial={comment.body}
          members={p.members}
          selfId={p.selfId}
          onSubmit={async (body, mentions) => {
            await p.actions.edit(comment.id, body, mentions);
            setEditing(false);
          }}
          onCancel={() => setEditing(false)}
        />
      ) : (
        <CommentBody text={comment.body} />
      )}
      {!editing && p.canComment && (mine || p.isOwner) && (
        <div className="flex gap-2">
          {mine && (
            <Button variant="quiet" size="sm" onClick={() => setEditing(true)}>
              Edit
            </Button>
          )}
          <Button
            variant="quiet"
            size="sm"
            onClick={() => {
              if (window.confirm(comment.id === thread.id ? "Delete this comment? Its replies stay." : "Delete this reply?")) void p.actions.remove(comment.id);
            }}
          >
            Delete
          </Button>
        </div>
      )}
    </div>
  );
}

/** One thread: its anchor, the first comment, replies, and the reply, resolve and reopen actions. */
export function CommentThreadCard(props: ThreadProps) {
  const { thread, currentLabel, canComment, focused, actions, onShowAnchor } = props;
  const ref = useRef<HTMLElement>(null);
  useEffect(() => {
    if (focused) ref.current?.scrollIntoView({ block: "center" });
  }, [focused]);
  const resolved = thread.resolvedAt !== null;
  const [replying, setReplying] = useState(false);
  const showLabel = SHOW_LABEL[thread.anchor.kind];
  const gone = thread.anchor.kind !== "lifeCycle" && thread.anchor.kind !== "snapshot" && currentLabel === null;
  return (
    <article
      ref={ref}
      aria-label={`Thread on ${currentLabel ?? thread.anchorLabel}`}
      data-thread-id={thread.id}
      className={`space-y-3 rounded-md border p-4 ${focused ? "border-indigo ring-2 ring-indigo/40" : "border-ink/15"} ${resolved ? "bg-ink/[0.03]" : "bg-white"}`}
    >
      <header className="flex flex-wrap items-center justify-between gap-2">
        <div className="flex flex-wrap items-center gap-2 text-sm">
          <span className="font-bold">On {currentLabel ?? thread.anchorLabel}</span>
          {gone && <Badge tone="warning">removed from the life cycle</Badge>}
          {resolved && <Badge>Resolved{thread.resolvedByName ? ` by ${thread.resolvedByName}` : ""}</Badge>}
        </div>
        {showLabel && !gone && (
          <Button variant="secondary" size="sm" onClick={() => onShowAnchor(thread.anchor)}>
            {showLabel}
          </Button>
        )}
      </header>
      <OneComment comment={thread} {...props} />
      {thread.replies.length > 0 && (
        <ol className="space-y-3 border-l-2 border-ink/10 pl-4" aria-label="Replies">
          {thread.replies.map((r) => (
            <li key={r.id}>
              <OneComment comment={r} {...props} />
            </li>
          ))}
        </ol>
      )}
      {canComment && (
        <div className="space-y-2 border-t border-ink/10 pt-3">
          {replying && !resolved ? (
            <CommentForm
              label="Reply"
              submitLabel="Reply"
              rows={2}
              compact
              members={props.members}
              selfId={props.selfId}
              onSubmit={async (body, mentions) => {
                await actions.reply(thread.id, body, mentions);
                setReplying(false);
              }}
              onCancel={() => setReplying(false)}
            />
          ) : (
            <div className="flex flex-wrap gap-2">
              {!resolved && (
                <Button variant="secondary" size="sm" onClick={() => setReplying(true)}>
                  Reply
                </Button>
              )}
              <Button variant="secondary" size="sm" onClick={() => void actions.setResolved(thread.id, !resolved)}>
                {resolved ? "Reopen thread" : "Resolve thread"}
              </Button>
            </div>
          )}
        </div>
      )}
    </article>
  );
}
