import { z } from "zod";

/** Longest comment or review summary, in characters. */
export const MAX_COMMENT_LENGTH = 5000;
export const MAX_REVIEW_MESSAGE_LENGTH = 2000;
export const MAX_REVIEWERS_PER_REQUEST = 20;
export const MAX_MENTIONS = 20;

const Id = z.string().trim().min(1, "Give the id.").max(200);
const Uuid = z.uuid({ message: "Not a valid id." });

/**
 * What a comment thread is about: a stage, an arrow (transition), a vital
 * rate, a matrix cell (row = stage at t+1 `to`, column = stage at t `from`),
 * a snapshot, or the life cycle as a whole. Ids are the life-cycle document's.
 */
export const CommentAnchorSchema = z.discriminatedUnion(
  "kind",
  [
    z.strictObject({ kind: z.literal("lifeCycle") }),
    z.strictObject({ kind: z.literal("stage"), id: Id }),
    z.strictObject({ kind: z.literal("transition"), id: Id }),
    z.strictObject({ kind: z.literal("rate"), id: Id }),
    z.strictObject({ kind: z.literal("cell"), to: Id, from: Id }),
    z.strictObject({ kind: z.literal("snapshot"), snapshotId: Uuid }),
  ],
  { error: 'The anchor kind is "lifeCycle", "stage", "transition", "rate", "cell" or "snapshot".' },
);
export type CommentAnchor = z.infer<typeof CommentAnchorSchema>;

const Body = z
  .string({ error: "Write the comment." })
  .trim()
  .min(1, "Write something: a comment cannot be empty.")
  .max(MAX_COMMENT_LENGTH, `A comment has at most ${MAX_COMMENT_LENGTH} characters.`);
const Mentions = z.array(Uuid).max(MAX_MENTIONS, `Mention at most ${MAX_MENTIONS} people in one comment.`).default([]);

export const CommentCreateSchema = z.strictObject({ anchor: CommentAnchorSchema, body: Body, mentions: Mentions });
export type CommentCreate = z.input<typeof CommentCreateSchema>;

export const CommentReplySchema = z.strictObject({ body: Body, mentions: Mentions });
export type CommentReply = z.input<typeof CommentReplySchema>;

export const CommentUpdateSchema = z.strictObject({ body: Body, mentions: Mentions });
export type CommentUpdate = z.input<typeof CommentUpdateSchema>;

export interface CommentView {
  id: string;
  authorId: string | null;
  authorName: string | null;
  /** "" once deleted (the reply keeps its place in the thread). */
  body: string;
  mentions: string[];
  createdAt: string;
  editedAt: string | null;
  deletedAt: string | null;
}

export interface CommentThread extends CommentView {
  lifeCycleId: string;
  anchor: CommentAnchor;
  /** How the anchor read when the thread started. */
  anchorLabel: string;
  resolvedAt: string | null;
  resolvedByName: string | null;
  replies: CommentView[];
}

export const REVIEW_DECISIONS = ["approved", "changes_requested"] as const;

export const ReviewRequestCreateSchema = z.strictObject({
  snapshotId: Uuid,
  reviewerIds: z.array(Uuid).min(1, "Choose at least one reviewer.").max(MAX_REVIEWERS_PER_REQUEST, `Ask at most ${MAX_REVIEWERS_PER_REQUEST} reviewers at once.`),
  message: z.string().trim().max(MAX_REVIEW_MESSAGE_LENGTH, `A message has at most ${MAX_REVIEW_MESSAGE_LENGTH} characters.`).default(""),
});
export type ReviewRequestCreate = z.input<typeof ReviewRequestCreateSchema>;

export const ReviewDecisionSchema = z.strictObject({
  snapshotId: Uuid,
  decision: z.enum(REVIEW_DECISIONS, { error: 'The decision is "approved" or "changes_requested".' }),
  summary: z
    .string({ error: "Write a summary." })
    .trim()
    .min(1, "Write a short summary of your review.")
    .max(MAX_COMMENT_LENGTH, `A summary has at most ${MAX_COMMENT_LENGTH} characters.`),
});
export type ReviewDecision = z.input<typeof ReviewDecisionSchema>;

export type ReviewState = "requested" | "approved" | "changes_requested";

export interface ReviewView {
  id: string;
  snapshotId: string;
  snapshotNumber: number;
  snapshotMessage: string;
  reviewerId: string;
  reviewerName: string;
  requestedByName: string | null;
  message: string;
  state: ReviewState;
  summary: string;
  createdAt: string;
  decidedAt: string | null;
}

/** A life cycle's review state, judged on its newest reviewed snapshot. */
export interface ReviewStatus {
  /** none: never reviewed; requested: waiting for decisions; approved: every decision on that snapshot approves. */
  state: "none" | "requested" | "approved" | "changes_requested";
  snapshotId: string | null;
  snapshotNumber: number | null;
  /** The model (stages, arrows, rates; not layout) differs from the approved snapshot. */
  changedSinceApproval: boolean;
  approvals: number;
  changeRequests: number;
  pending: number;
}

export interface LifeCycleReviews {
  status: ReviewStatus;
  reviews: ReviewView[];
}

export const NotificationModeSchema = z.enum(["immediate", "digest", "off"], { error: 'The mode is "immediate", "digest" or "off".' });
export type NotificationMode = z.infer<typeof NotificationModeSchema>;

export const NotificationPreferencesSchema = z.strictObject({ mode: NotificationModeSchema });
export type NotificationPreferences = z.infer<typeof NotificationPreferencesSchema>;

export const UnsubscribeSchema = z.strictObject({ token: z.string().trim().min(1, "The link has no token.").max(300) });
export type Unsubscribe = z.infer<typeof UnsubscribeSchema>;

/** Kinds of activity the log filters by (prefixes of audit_events.action). */
export const ACTIVITY_KINDS = ["study", "member", "invitation", "life_cycle", "snapshot", "comment", "review", "run"] as const;

export const ActivityQuerySchema = z.strictObject({
  kind: z.enum(ACTIVITY_KINDS, { error: `The kind is one of ${ACTIVITY_KINDS.join(", ")}.` }).optional(),
  actorId: Uuid.optional(),
  lifeCycleId: Uuid.optional(),
  /** ISO dates or date-times: from (inclusive) and to (inclusive, a date covers the whole day). */
  from: z.iso.date({ message: "Give a date as YYYY-MM-DD." }).optional(),
  to: z.iso.date({ message: "Give a date as YYYY-MM-DD." }).optional(),
  /** Paging: events with an id below this one. */
  before: z.coerce.number().int().positive().optional(),
  limit: z.coerce.number().int().min(1).max(200).default(200),
});
export type ActivityQuery = z.infer<typeof ActivityQuerySchema>;
