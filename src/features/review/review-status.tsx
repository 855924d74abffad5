import type { ReviewStatus } from "../../../shared/schemas/review";
import { useReviews } from "../../api/reviews";
import { Badge } from "../../components/ui/badge";
import { Button } from "../../components/ui/button";

/** The life cycle's review state in words, with a link to the changes made since an approval. */
export function ReviewStatusBadge({ status, onShowChanges }: { status: ReviewStatus; onShowChanges: (snapshotId: string) => void }) {
  if (status.state === "none") return <Badge>Not reviewed</Badge>;
  const n = `snapshot #${status.snapshotNumber}`;
  return (
    <span className="inline-flex flex-wrap items-center gap-2" data-review-state={status.state}>
      {status.state === "approved" && <Badge tone="accent">✓ Approved · {n}</Badge>}
      {status.state === "changes_requested" && <Badge tone="warning">! Changes requested · {n}</Badge>}
      {status.state === "requested" && (
        <Badge>
          Review requested · {n} ({status.pending} waiting)
        </Badge>
      )}
      {status.changedSinceApproval && status.snapshotId && (
        <>
          <Badge tone="warning">Changed since approval</Badge>
          <Button variant="quiet" size="sm" onClick={() => onShowChanges(status.snapshotId!)}>
            See the changes
          </Button>
        </>
      )}
    </span>
  );
}

/** The review status of a life cycle, for the editor's header (loads on its own). */
export function LifeCycleReviewStatus({ lifeCycleId, onShowChanges }: { lifeCycleId: string; onShowChanges: (snapshotId: string) => void }) {
  const reviews = useReviews(lifeCycleId);
  if (!reviews.data) return null;
  return <ReviewStatusBadge status={reviews.data.status} onShowChanges={onShowChanges} />;
}
