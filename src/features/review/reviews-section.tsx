import { type FormEvent, useState } from "react";
import type { Role } from "../../../shared/schemas/studies";
import { roleAtLeast } from "../../../shared/schemas/studies";
import type { ReviewView } from "../../../shared/schemas/review";
import { MAX_COMMENT_LENGTH, MAX_REVIEW_MESSAGE_LENGTH } from "../../../shared/schemas/review";
import { isApiError } from "../../api/client";
import { useDecideReview, useRequestReview, useReviews } from "../../api/reviews";
import type { SnapshotSummary } from "../../api/snapshots";
import { Alert } from "../../components/ui/alert";
import { Badge } from "../../components/ui/badge";
import { Button } from "../../components/ui/button";
import { SelectField, TextAreaField } from "../../components/ui/field";
import { QueryError } from "../../components/ui/query-error";
import { Loading } from "../../components/ui/spinner";
import { RelativeTime } from "../../components/ui/time";
import { CommentBody } from "./comment-body";
import { ReviewStatusBadge } from "./review-status";

const STATE_LABEL: Record<ReviewView["state"], string> = { requested: "Waiting for review", approved: "Approved", changes_requested: "Changes requested" };

function errorText(error: unknown, field?: string): string | undefined {
  if (!error) return undefined;
  if (isApiError(error)) {
    const f = field ? error.fields?.find((x) => x.path === field || x.path.startsWith(`${field}.`)) : undefined;
    return f?.message ?? error.message;
  }
  return (error as Error).message;
}

interface ReviewsSectionProps {
  lifeCycleId: string;
  studyId: string;
  role: Role;
  selfId: string | null;
  snapshots: readonly SnapshotSummary[];
  members: readonly { userId: string; name: string; role: Role }[];
  /** The snapshot an e-mailed link pointed at. */
  focusSnapshotId: string | null;
  onShowChanges: (snapshotId: string) => void;
}

/** Review requests and decisions, newest snapshot first, with the forms the person's role allows. */
export function ReviewsSection({ lifeCycleId, studyId, role, selfId, snapshots, members, focusSnapshotId, onShowChanges }: ReviewsSectionProps) {
  const reviews = useReviews(lifeCycleId);
  const request = useRequestReview(lifeCycleId, studyId);
  const decide = useDecideReview(lifeCycleId, studyId);
  const newest = snapshots[0]?.id ?? "";
  const [requestSnapshot, setRequestSnapshot] = useState(focusSnapshotId ?? newest);
  const [reviewerIds, setReviewerIds] = useState<string[]>([]);
  const [message, setMessage] = useState("");
  const [decisionSnapshot, setDecisionSnapshot] = useState(focusSnapshotId ?? newest);
  const [decision, setDecision] = useState<"approved" | "changes_requested">("approved");
  const [summary, setSummary] = useState("");
  const [notice, setNotice] = useState("");

  const candidates = members.filter((m) => m.userId !== selfId && roleAtLeast(m.role, "reviewer"));
  const canRequest = roleAtLeast(role, "editor");
  const canReview = roleAtLeast(role, "reviewer");

  function submitRequest(event: FormEvent) {
    event.preventDefault();
    request.mutate(
      { snapshotId: requestSnapshot || newest, reviewerIds, message },
      {
        onSuccess: () => {
          setNotice(`Asked ${candidates.filter((c) => reviewerIds.includes(c.userId)).map((c) => c.name).join(", ")} for a review; they get an e-mail.`);
          setReviewerIds([]);
          setMessage("");
        },
      },
    );
  }

  function submitDecision(event: FormEvent) {
    event.preventDefault();
    decide.mutate(
      { snapshotId: decisionSnapshot || newest, decision, summary },
      {
        onSuccess: () => {
          setNotice(decision === "approved" ? "Your approval is recorded." : "Your request for changes is recorded.");
          setSummary("");
        },
      },
    );
  }

  if (reviews.isPending) return <Loading label="Loading reviews…" />;
  if (reviews.isError) return <QueryError error={reviews.error} what="the reviews" onRetry={() => reviews.refetch()} />;
  const { status, reviews: list } = reviews.data;
  const snapshotOptions = snapshots.map((s) => (
    <option key={s.id} value={s.id}>
      #{s.number} {s.message}
    </option>
  ));

  return (
    <section aria-labelledby="reviews-heading" className="space-y-4 rounded-lg border border-ink/15 bg-white p-5 shadow-sm">
      <div className="flex flex-wrap items-center justify-between gap-2">
        <h2 id="reviews-heading" className="text-xl font-bold">
          Reviews
        </h2>
        <ReviewStatusBadge status={status} onShowChanges={onShowChanges} />
      </div>
      <p className="text-sm text-ink/80">
        A review is of a snapshot, so an approval always names the exact state that was approved. Results support and do not replace expert judgement;
        decisions that rest on this model follow the rules of the responsible authority and its peer review.
      </p>
      {notice && <Alert tone="success">{notice}</Alert>}
      {list.length === 0 ? (
        <p className="text-ink/75">Nobody has been asked to review this life cycle yet.</p>
      ) : (
        <ol className="space-y-3">
          {list.map((r) => (
            <li key={r.id} className={`rounded-md border p-3 text-sm ${r.snapshotId === focusSnapshotId ? "border-indigo" : "border-ink/15"}`}>
              <p className="flex flex-wrap items-center gap-2">
                <span className="font-bold">{r.reviewerName}</span>
                <Badge tone={r.state === "approved" ? "accent" : r.state === "changes_requested" ? "warning" : "neutral"}>{STATE_LABEL[r.state]}</Badge>
                <span className="text-ink/75">
                  snapshot #{r.snapshotNumber} ({r.snapshotMessage})
                </span>
              </p>
              {r.requestedByName && (
                <p className="text-ink/75">
                  Asked by {r.requestedByName} <RelativeTime iso={r.createdAt} />
                  {r.message && <>: “{r.message}”</>}
                </p>
              )}
              {r.decidedAt && (
                <div className="mt-1">
                  <p className="text-ink/75">
                    Decided <RelativeTime iso={r.decidedAt} />
                  </p>
                  <CommentBody text={r.summary} />
                </div>
              )}
            </li>
          ))}
        </ol>
      )}

      {snapshots.length === 0 && (canRequest || canReview) && (
        <p className="rounded-md border border-dashed border-ink/30 p-3 text-sm">Reviews are of snapshots: take one in History first.</p>
      )}

      {canReview && snapshots.length > 0 && (
        <form onSubmit={submitDecision} className="space-y-3 border-t border-ink/10 pt-4" aria-labelledby="decision-heading" noValidate>
          <h3 id="decision-heading" className="font-bold">
            Your review
          </h3>
          <SelectField label="Snapshot reviewed" value={decisionSnapshot || newest} onChange={(e) => setDecisionSnapshot(e.target.value)} error={isApiError(decide.error) && decide.error.status === 404 ? decide.error.message : undefined}>
            {snapshotOptions}
          </SelectField>
          <fieldset className="space-y-1">
            <legend className="font-bold">Decision</legend>
            <label className="flex items-center gap-2">
              <input type="radio" name="decision" checked={decision === "approved"} onChange={() => setDecision("approved")} /> Approve
            </label>
            <label className="flex items-center gap-2">
              <input type="radio" name="decision" checked={decision === "changes_requested"} onChange={() => setDecision("changes_requested")} /> Ask for changes
            </label>
          </fieldset>
          <TextAreaField
            label="Summary"
            rows={3}
            value={summary}
            maxLength={MAX_COMMENT_LENGTH}
            onChange={(e) => setSummary(e.target.value)}
            error={isApiError(decide.error) && decide.error.status === 400 ? errorText(decide.error, "summary") : undefined}
            description="What you checked and what, if anything, must change. Markdown as in comments."
          />
          <Button type="submit" pending={decide.isPending}>
            {decision === "approved" ? "Approve snapshot" : "Ask for changes"}
          </Button>
        </form>
      )}

      {canRequest && snapshots.length > 0 && (
        <form onSubmit={submitRequest} className="space-y-3 border-t border-ink/10 pt-4" aria-labelledby="request-heading" noValidate>
          <h3 id="request-heading" className="font-bold">
            Ask for a review
          </h3>
          <SelectField label="Snapshot to review" value={requestSnapshot || newest} onChange={(e) => setRequestSnapshot(e.target.value)}>
            {snapshotOptions}
          </SelectField>
          <fieldset className="space-y-1">
            <legend className="font-bold">Reviewers</legend>
            {candidates.length === 0 ? (
              <p className="text-sm text-ink/75">No other member can review: invite someone with the reviewer role from the Study page.</p>
            ) : (
              candidates.map((c) => (
                <label key={c.userId} className="flex items-center gap-2">
                  <input
                    type="checkbox"
                    checked={reviewerIds.includes(c.userId)}
                    onChange={(e) => setReviewerIds((ids) => (e.target.checked ? [...ids, c.userId] : ids.filter((x) => x !== c.userId)))}
                  />
                  {c.name} <span className="text-sm text-ink/70">({c.role})</span>
                </label>
              ))
            )}
            {isApiError(request.error) && request.error.status === 400 && errorText(request.error, "reviewerIds") && (
              <p className="text-sm font-bold text-brick">✕ {errorText(request.error, "reviewerIds")}</p>
            )}
          </fieldset>
          <TextAreaField label="Note to the reviewers (optional)" rows={2} maxLength={MAX_REVIEW_MESSAGE_LENGTH} value={message} onChange={(e) => setMessage(e.target.value)} />
          <Button type="submit" pending={request.isPending} disabled={candidates.length === 0}>
            Ask for review
          </Button>
          {request.error && !(isApiError(request.error) && request.error.status === 400) && <Alert tone="error">{errorText(request.error)}</Alert>}
        </form>
      )}
      {decide.error && !(isApiError(decide.error) && [400, 404].includes(decide.error.status)) && <Alert tone="error">{errorText(decide.error)}</Alert>}
    </section>
  );
}
