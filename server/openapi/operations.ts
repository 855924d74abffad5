/**
 * What each /api/v1 route does, for the OpenAPI document. Request bodies and
 * responses point at the zod schemas the routes parse with (shared/schemas),
 * so the document cannot drift from what the server accepts.
 *
 * tests/api/openapi.test.ts compares this list with the routes mounted by
 * createApiRouter, both ways: a new route fails the test until it is described here.
 */
import type { z } from "zod";
import {
  ApiTokenCreateSchema,
  ApiTokenSchema,
  InvitationCreateSchema,
  InvitationPreviewSchema,
  InvitationSchema,
  MailMessageSchema,
  MemberSchema,
  MemberUpdateSchema,
  NewApiTokenSchema,
  PasswordChangeSchema,
  PasswordResetConfirmSchema,
  PasswordResetRequestSchema,
  ProfileUpdateSchema,
  SessionInfoSchema,
  SignInSchema,
  SignUpConfirmSchema,
  SignUpSchema,
  StudyCreateSchema,
  StudySchema,
  StudyUpdateSchema,
  UserSchema,
  type Role,
} from "../../shared/schemas";
import {
  AnalyzeDocumentRequestSchema,
  AnalyzeMatrixRequestSchema,
  DeletedLifeCycleSchema,
  LifeCycleCreateSchema,
  LifeCycleDuplicateSchema,
  LifeCycleRecordSchema,
  LifeCycleSummarySchema,
  LifeCycleUpdateSchema,
  SnapshotCreateSchema,
  SnapshotRestoreSchema,
  SnapshotSchema,
  SnapshotSummarySchema,
} from "../../shared/schemas/life-cycles";
import {
  CountsAnalysisQuerySchema,
  DatasetRenameSchema,
  FateAnalysisSettingsSchema,
  PreviewSchema,
  RunOnDatasetSchema,
  StartLifeCycleSchema,
  UploadSchema,
} from "../../shared/schemas/field-data";
import { ClimateFitRequestSchema, ClimateLambdaRequestSchema, ClimateTrajectoryRequestSchema } from "../../shared/schemas/climate";
import { LeversRequestSchema, LtreRequestSchema } from "../../shared/schemas/levers";
import { ReportQuerySchema } from "../../shared/schemas/report";
import {
  ActivityQuerySchema,
  CommentCreateSchema,
  CommentReplySchema,
  CommentUpdateSchema,
  NotificationPreferencesSchema,
  ReviewDecisionSchema,
  ReviewRequestCreateSchema,
  UnsubscribeSchema,
} from "../../shared/schemas/review";
import { RiskSettingsSchema } from "../../shared/schemas/risk";
import { RunCreateSchema } from "../../shared/schemas/runs";
import { LifeCycleSchema } from "../../shared/lifecycle";

export type Access = "public" | "user" | Role;
export type Method = "get" | "post" | "put" | "patch" | "delete";

/** A schema with the name it has under components.schemas. */
export interface Named {
  name: string;
  schema: z.ZodType;
}
const named = (name: string, schema: z.ZodType): Named => ({ name, schema });

export interface Response {
  status: number;
  description: string;
  /** JSON body; for a list, wrap with `list`. */
  json?: Named | { list: Named } | { description: string };
  /** A file instead of JSON. */
  file?: "application/pdf" | "application/zip" | "text/csv";
}

export interface Operation {
  method: Method;
  /** Express path under /api/v1 (":param" style). */
  path: string;
  tag: string;
  summary: string;
  description?: string;
  access: Access;
  body?: Named | { oneOf: Named[] };
  /** A multipart/form-data upload: a CSV `file` plus text fields; `fields` names the schema the text fields follow (JSON fields as text). */
  multipart?: { fields: Named; description: string };
  query?: Named;
  responses: Response[];
  /** Mounted only while the Mail outbox is on (never in production). */
  devOnly?: true;
}


/** Schemas listed under components.schemas that no operation names directly (referenced from descriptions). */
export const EXTRA_SCHEMAS: Named[] = [named("RiskSettings", RiskSettingsSchema), named("LifeCycleDocument", LifeCycleSchema), named("User", UserSchema)];

const ok = (description: string, json?: Response["json"]): Response => ({ status: 200, description, ...(json ? { json } : {}) });
const created = (description: string, json: Response["json"]): Response => ({ status: 201, description, json });
const noContent = (description: string): Response => ({ status: 204, description });
const list = (n: Named) => ({ list: n });

const Study = named("Study", StudySchema);
const Member = named("Member", MemberSchema);
const Invitation = named("Invitation", InvitationSchema);
const LifeCycleSummary = named("LifeCycleSummary", LifeCycleSummarySchema);
const LifeCycleRecord = named("LifeCycleRecord", LifeCycleRecordSchema);
const SnapshotSummary = named("SnapshotSummary", SnapshotSummarySchema);
const ApiToken = named("ApiToken", ApiTokenSchema);
const Analysis = {
  description:
    "The analysis: lambda (λ), stableStage (w), reproductiveValue (v), sensitivity, elasticity, secondEigenvalue, dampingRatio, diagnostics, lifeHistory, projection and, for documents, stageIds, matrices and vitalRates. Values that do not exist are null, with the reason in nullReasons. The README's field table describes each one.",
};
const RunRecord = {
  description: "A Run: id, lifeCycleId, kind, status (queued, running, succeeded, failed, cancelled), progress 0–1, chunksDone, chunksTotal, settings, error, dates, and result once it has succeeded.",
};

export const OPERATIONS: Operation[] = [
  { method: "get", path: "/health", tag: "Service", summary: "Is the server up and its database reachable?", access: "public", responses: [ok("The server answers.", { description: "{ ok: true }" })] },
  {
    method: "get",
    path: "/openapi.json",
    tag: "Service",
    summary: "This API described as an OpenAPI 3.1 document",
    access: "public",
    responses: [ok("The OpenAPI 3.1 description of every route under /api/v1.", { description: "An OpenAPI 3.1 document." })],
  },

  // Sign-in and accounts
  { method: "get", path: "/auth/session", tag: "Account", summary: "Who is signed in (null when nobody)", access: "public", responses: [ok("The session.", named("SessionInfo", SessionInfoSchema))] },
  {
    method: "post",
    path: "/auth/sign-up",
    tag: "Account",
    summary: "Start an account: e-mails a link that creates it",
    description:
      "Answers 202 with the same message whether or not the address already has an account (the e-mail tells them apart: a link that creates the account, or a note to the owner to sign in or reset). Only with an invitation token sent to that very address is the account created at once (201, signed in).",
    access: "public",
    body: named("SignUp", SignUpSchema),
    responses: [
      { status: 202, description: "A message is on its way to the address.", json: { description: "{ message }" } },
      created("Created and signed in (an invitation sent to this address).", { description: "{ user, joinedStudyId }" }),
    ],
  },
  {
    method: "post",
    path: "/auth/sign-up/confirm",
    tag: "Account",
    summary: "Create the account with the e-mailed link's token, and sign in",
    access: "public",
    body: named("SignUpConfirm", SignUpConfirmSchema),
    responses: [created("Created and signed in.", { description: "{ user, joinedStudyId? }" })],
  },
  { method: "post", path: "/auth/sign-in", tag: "Account", summary: "Sign in with e-mail and password (sets the session cookie)", access: "public", body: named("SignIn", SignInSchema), responses: [ok("Signed in.", { description: "{ user }" })] },
  { method: "post", path: "/auth/sign-out", tag: "Account", summary: "Sign out", access: "public", responses: [noContent("Signed out.")] },
  { method: "post", path: "/auth/password-reset/request", tag: "Account", summary: "E-mail a password-reset link", access: "public", body: named("PasswordResetRequest", PasswordResetRequestSchema), responses: [{ status: 202, description: "Sent if an account uses the address.", json: { description: "{ message }" } }] },
  { method: "post", path: "/auth/password-reset/confirm", tag: "Account", summary: "Set a new password with the link's token", access: "public", body: named("PasswordResetConfirm", PasswordResetConfirmSchema), responses: [noContent("Password changed.")] },
  { method: "patch", path: "/account/profile", tag: "Account", summary: "Change your name", access: "user", body: named("ProfileUpdate", ProfileUpdateSchema), responses: [ok("Changed.", { description: "{ user }" })] },
  { method: "post", path: "/account/password", tag: "Account", summary: "Change your password (signed in, not with a token)", access: "user", body: named("PasswordChange", PasswordChangeSchema), responses: [noContent("Changed.")] },
  { method: "get", path: "/account/tokens", tag: "API tokens", summary: "Your API tokens that are not revoked", access: "user", responses: [ok("Your tokens (never their secrets).", list(ApiToken))] },
  {
    method: "post",
    path: "/account/tokens",
    tag: "API tokens",
    summary: "Mint an API token (signed in, not with a token)",
    description: "scope \"read\" allows GET requests and POST /analyze, /levers, /ltre and /climate/lambda, /climate/fit, /climate/trajectory; \"read-write\" everything your roles allow. expiresInDays: null for a token that never expires.",
    access: "user",
    body: named("ApiTokenCreate", ApiTokenCreateSchema),
    responses: [created("The token, with its secret shown this once.", named("NewApiToken", NewApiTokenSchema))],
  },
  { method: "delete", path: "/account/tokens/:tokenId", tag: "API tokens", summary: "Revoke an API token (signed in, not with a token)", access: "user", responses: [noContent("Revoked: requests with it now get 401.")] },

  // Studies
  { method: "get", path: "/studies", tag: "Studies", summary: "Studies you are a member of", access: "user", responses: [ok("Your Studies.", list(Study))] },
  { method: "post", path: "/studies", tag: "Studies", summary: "Create a Study (you become its owner)", access: "user", body: named("StudyCreate", StudyCreateSchema), responses: [created("The new Study.", Study)] },
  { method: "get", path: "/studies/:studyId", tag: "Studies", summary: "One Study", access: "viewer", responses: [ok("The Study.", Study)] },
  { method: "patch", path: "/studies/:studyId", tag: "Studies", summary: "Rename or describe a Study", access: "owner", body: named("StudyUpdate", StudyUpdateSchema), responses: [ok("The Study.", Study)] },
  { method: "get", path: "/studies/:studyId/members", tag: "Studies", summary: "Members and their roles", access: "viewer", responses: [ok("Members.", list(Member))] },
  { method: "patch", path: "/studies/:studyId/members/:userId", tag: "Studies", summary: "Change a member's role", access: "owner", body: named("MemberUpdate", MemberUpdateSchema), responses: [ok("The member.", Member)] },
  { method: "delete", path: "/studies/:studyId/members/:userId", tag: "Studies", summary: "Remove a member (owners), or leave (anyone, their own id)", access: "viewer", responses: [noContent("Removed.")] },
  { method: "get", path: "/studies/:studyId/invitations", tag: "Studies", summary: "Pending invitations", access: "owner", responses: [ok("Invitations.", list(Invitation))] },
  { method: "post", path: "/studies/:studyId/invitations", tag: "Studies", summary: "Invite someone by e-mail with a role", access: "owner", body: named("InvitationCreate", InvitationCreateSchema), responses: [created("The invitation (the e-mail is on its way).", Invitation)] },
  { method: "delete", path: "/studies/:studyId/invitations/:invitationId", tag: "Studies", summary: "Withdraw an invitation", access: "owner", responses: [noContent("Withdrawn.")] },
  {
    method: "get",
    path: "/studies/:studyId/activity",
    tag: "Studies",
    summary: "The Study's activity, newest first, filtered by kind, person, life cycle and dates",
    access: "viewer",
    query: named("ActivityQuery", ActivityQuerySchema),
    responses: [ok("Activity.", { description: "Activity rows (AuditEvent), newest first, and whether there are more." })],
  },
  {
    method: "get",
    path: "/studies/:studyId/export.zip",
    tag: "Exports",
    summary: "The whole Study as a zip",
    description:
      "Each life cycle as Stagewright JSON, its matrices A, U and F and its results as CSV (text cells that would start a spreadsheet formula are escaped), and its report as PDF; a README.txt lists the files. A Study too large to export answers 413 with the size and the limit.",
    access: "viewer",
    responses: [{ status: 200, description: "The zip file.", file: "application/zip" }, { status: 413, description: "Larger than the export limit.", json: { description: "ApiError" } }],
  },
  { method: "get", path: "/invitations/:token", tag: "Studies", summary: "What an invitation link offers (the link is the credential)", access: "public", responses: [ok("The invitation.", named("InvitationPreview", InvitationPreviewSchema))] },
  { method: "post", path: "/invitations/:token/accept", tag: "Studies", summary: "Accept an invitation", access: "user", responses: [ok("Joined.", { description: "{ studyId }" })] },

  // Life cycles
  { method: "get", path: "/studies/:studyId/life-cycles", tag: "Life cycles", summary: "Life cycles of a Study", access: "viewer", responses: [ok("Life cycles.", list(LifeCycleSummary))] },
  {
    method: "post",
    path: "/studies/:studyId/life-cycles",
    tag: "Life cycles",
    summary: "Create a life cycle: blank by name, or from a Stagewright document",
    access: "editor",
    body: named("LifeCycleCreate", LifeCycleCreateSchema),
    responses: [created("The new life cycle.", LifeCycleRecord)],
  },
  { method: "get", path: "/studies/:studyId/deleted-life-cycles", tag: "Life cycles", summary: "Deleted life cycles that can still be restored", access: "editor", responses: [ok("Deleted life cycles.", list(named("DeletedLifeCycle", DeletedLifeCycleSchema)))] },
  { method: "post", path: "/life-cycles/:lifeCycleId/undelete", tag: "Life cycles", summary: "Restore a deleted life cycle", access: "editor", responses: [ok("The life cycle.", LifeCycleRecord)] },
  { method: "get", path: "/life-cycles/:lifeCycleId", tag: "Life cycles", summary: "A life cycle with its document", access: "viewer", responses: [ok("The life cycle.", LifeCycleRecord)] },
  {
    method: "put",
    path: "/life-cycles/:lifeCycleId",
    tag: "Life cycles",
    summary: "Save a life cycle's document",
    description: "Send the version you loaded; if someone saved since, the answer is 409 with the current state and nothing is overwritten. The document follows the LifeCycleDocument schema.",
    access: "editor",
    body: named("LifeCycleUpdate", LifeCycleUpdateSchema),
    responses: [ok("Saved.", LifeCycleRecord), { status: 409, description: "Someone saved a newer version.", json: { description: "ApiError with the current life cycle" } }],
  },
  { method: "delete", path: "/life-cycles/:lifeCycleId", tag: "Life cycles", summary: "Delete a life cycle (restorable for 30 days)", access: "editor", responses: [noContent("Deleted.")] },
  { method: "post", path: "/life-cycles/:lifeCycleId/duplicate", tag: "Life cycles", summary: "Copy a life cycle", access: "editor", body: named("LifeCycleDuplicate", LifeCycleDuplicateSchema), responses: [created("The copy.", LifeCycleRecord)] },
  { method: "get", path: "/life-cycles/:lifeCycleId/analysis", tag: "Analysis", summary: "Analyse a stored life cycle", access: "viewer", responses: [ok("The analysis.", Analysis), { status: 422, description: "The life cycle cannot be analysed as it stands (the message says why).", json: { description: "ApiError" } }] },
  {
    method: "post",
    path: "/analyze",
    tag: "Analysis",
    summary: "Analyse a bare matrix or a life-cycle document (stores nothing; read tokens may call it)",
    access: "user",
    body: { oneOf: [named("AnalyzeMatrixRequest", AnalyzeMatrixRequestSchema), named("AnalyzeDocumentRequest", AnalyzeDocumentRequestSchema)] },
    responses: [ok("The analysis.", Analysis)],
  },
  {
    method: "get",
    path: "/life-cycles/:lifeCycleId/report",
    tag: "Reports",
    summary: "The report's contents as JSON (what the report page and PDF show)",
    access: "viewer",
    query: named("ReportQuery", ReportQuerySchema),
    responses: [ok("The report.", { description: "Title, Study, snapshot, authors, stages, rates, matrix, analysis, verdict, λ's interval from the newest Monte Carlo Run, Levers, Climate (thermal responses, λ(T) window, dλ/dT by rate, the newest warming Run; null without thermal responses), Risk summary, review, cautions and the figures as SVG." })],
  },
  {
    method: "get",
    path: "/life-cycles/:lifeCycleId/report.pdf",
    tag: "Reports",
    summary: "The report as a PDF (A4 or Letter)",
    access: "viewer",
    query: named("ReportQuery", ReportQuerySchema),
    responses: [{ status: 200, description: "The PDF.", file: "application/pdf" }],
  },

  // Field data
  { method: "get", path: "/studies/:studyId/datasets", tag: "Field data", summary: "Datasets of a Study", access: "viewer", responses: [ok("Datasets.", { description: "Datasets with their kind, file, rows, stages, sites and years." })] },
  {
    method: "post",
    path: "/studies/:studyId/datasets/preview",
    tag: "Field data",
    summary: "Read the first rows of a CSV file and guess its columns (stores nothing)",
    access: "editor",
    multipart: { fields: named("DatasetPreview", PreviewSchema), description: "file: the CSV; options: JSON text of the parse options (delimiter, decimal comma)." },
    responses: [ok("Columns, first rows and the parse options used.", { description: "The preview." })],
  },
  {
    method: "post",
    path: "/studies/:studyId/datasets/check",
    tag: "Field data",
    summary: "Check every row of a CSV file against a column mapping (stores nothing)",
    access: "editor",
    multipart: { fields: named("DatasetUpload", UploadSchema), description: "file: the CSV; kind, name; mapping and options: JSON text." },
    responses: [ok("The row-level validation report.", { description: "Problems by row and column, and what would be imported." })],
  },
  {
    method: "post",
    path: "/studies/:studyId/datasets",
    tag: "Field data",
    summary: "Upload counts or stage-fate records as a dataset (the file is kept as uploaded)",
    access: "editor",
    multipart: { fields: named("DatasetUpload", UploadSchema), description: "file: the CSV; kind (counts or stage-fates), name; mapping and options: JSON text." },
    responses: [created("The dataset.", { description: "The new dataset." }), { status: 413, description: "The file is larger than the upload limit.", json: { description: "ApiError" } }],
  },
  { method: "get", path: "/datasets/:datasetId", tag: "Field data", summary: "A dataset", access: "viewer", responses: [ok("The dataset.", { description: "The dataset with its rows." })] },
  { method: "patch", path: "/datasets/:datasetId", tag: "Field data", summary: "Rename a dataset", access: "editor", body: named("DatasetRename", DatasetRenameSchema), responses: [ok("The dataset.", { description: "The dataset." })] },
  { method: "delete", path: "/datasets/:datasetId", tag: "Field data", summary: "Delete a dataset", access: "editor", responses: [noContent("Deleted.")] },
  { method: "get", path: "/datasets/:datasetId/file", tag: "Field data", summary: "The file exactly as uploaded", access: "viewer", responses: [{ status: 200, description: "The CSV file.", file: "text/csv" }] },
  {
    method: "get",
    path: "/datasets/:datasetId/counts-analysis",
    tag: "Field data",
    summary: "Count-based estimates: λ per interval, geometric mean, μ and σ²",
    access: "viewer",
    query: named("CountsAnalysisQuery", CountsAnalysisQuerySchema),
    responses: [ok("The estimates.", { description: "Count-based estimates." })],
  },
  {
    method: "get",
    path: "/datasets/:datasetId/fate-analysis",
    tag: "Field data",
    summary: "Transition matrix estimated from stage-fate records, with sample sizes and intervals",
    access: "viewer",
    query: named("FateAnalysisSettings", FateAnalysisSettingsSchema),
    responses: [ok("The estimated matrix.", { description: "Estimated transition matrix with sample sizes and CIs." })],
  },
  { method: "post", path: "/datasets/:datasetId/life-cycles", tag: "Field data", summary: "Start a life cycle from a dataset's estimates", access: "editor", body: named("StartLifeCycle", StartLifeCycleSchema), responses: [created("The new life cycle.", LifeCycleRecord)] },
  { method: "get", path: "/datasets/:datasetId/runs", tag: "Field data", summary: "Runs on a dataset (bootstraps), newest first", access: "viewer", responses: [ok("Runs.", RunRecord)] },
  { method: "post", path: "/datasets/:datasetId/runs", tag: "Field data", summary: "Start a Run on a dataset (a bootstrap of λ)", access: "editor", body: named("RunOnDataset", RunOnDatasetSchema), responses: [created("The queued Run.", RunRecord)] },

  // Levers
  {
    method: "post",
    path: "/levers",
    tag: "Levers",
    summary: "Scenarios compared, levers ranked, break-even values of a life-cycle document (stores nothing; read tokens may call it)",
    access: "user",
    body: named("LeversRequest", LeversRequestSchema),
    responses: [ok("Scenarios with λ, verdict, R0 and generation time; levers ranked by the exact change in λ; break-even values.", { description: "Levers of the document." })],
  },
  {
    method: "post",
    path: "/ltre",
    tag: "Levers",
    summary: "Life-table response experiment between two life-cycle documents (stores nothing; read tokens may call it)",
    access: "user",
    body: named("LtreRequest", LtreRequestSchema),
    responses: [ok("Contributions of each matrix entry and vital rate to the difference in λ.", { description: "LTRE contributions." })],
  },

  // Climate
  {
    method: "post",
    path: "/climate/lambda",
    tag: "Climate",
    summary: "λ over temperature of a life-cycle document: the persistence window (λ ≥ 1) with its edges, the optimum and dλ/dT (stores nothing; read tokens may call it)",
    access: "user",
    body: named("ClimateLambdaRequest", ClimateLambdaRequestSchema),
    responses: [ok("λ and the thermal rates at each temperature, the window's edges (λ = 1 within 1e-9), the optimum, the slope and clamped probabilities.", { description: "λ(T) of the document." })],
  },
  {
    method: "post",
    path: "/climate/fit",
    tag: "Climate",
    summary: "Fit a thermal response to measurements by nonlinear least squares, with standard errors from the Jacobian (stores nothing; read tokens may call it)",
    access: "user",
    body: named("ClimateFitRequest", ClimateFitRequestSchema),
    responses: [ok("Estimates with SEs, convergence and the reason when it fails, residuals, the fitted curve and the response ready to attach.", { description: "The fit." })],
  },
  {
    method: "post",
    path: "/climate/trajectory",
    tag: "Climate",
    summary: "Project a life-cycle document through a warming trajectory's mean temperatures (stores nothing; read tokens may call it)",
    access: "user",
    body: named("ClimateTrajectoryRequest", ClimateTrajectoryRequestSchema),
    responses: [ok("N(t), each year's λ and the first year with λ below 1.", { description: "The projection." })],
  },

  // Review
  { method: "get", path: "/life-cycles/:lifeCycleId/comments", tag: "Review", summary: "Comment threads with their replies", access: "viewer", responses: [ok("Threads.", { description: "Comment threads, each with its anchor, replies and state." })] },
  {
    method: "post",
    path: "/life-cycles/:lifeCycleId/comments",
    tag: "Review",
    summary: "Start a thread anchored to the life cycle, a stage, an arrow, a rate, a matrix cell or a snapshot",
    access: "reviewer",
    body: named("CommentCreate", CommentCreateSchema),
    responses: [created("The thread.", { description: "The new thread." })],
  },
  { method: "post", path: "/comments/:commentId/replies", tag: "Review", summary: "Reply to a thread", access: "reviewer", body: named("CommentReply", CommentReplySchema), responses: [created("The reply.", { description: "The reply." })] },
  { method: "patch", path: "/comments/:commentId", tag: "Review", summary: "Edit your own comment", access: "reviewer", body: named("CommentUpdate", CommentUpdateSchema), responses: [ok("The comment.", { description: "The comment as edited." })] },
  { method: "delete", path: "/comments/:commentId", tag: "Review", summary: "Delete your own comment (owners: any comment)", access: "reviewer", responses: [noContent("Deleted.")] },
  { method: "post", path: "/comments/:commentId/resolve", tag: "Review", summary: "Mark a thread resolved", access: "reviewer", responses: [ok("The thread.", { description: "The thread, resolved." })] },
  { method: "post", path: "/comments/:commentId/reopen", tag: "Review", summary: "Reopen a resolved thread", access: "reviewer", responses: [ok("The thread.", { description: "The thread, open again." })] },
  { method: "get", path: "/life-cycles/:lifeCycleId/reviews", tag: "Review", summary: "Review requests, decisions and the review status", access: "viewer", responses: [ok("The review status and the reviews.", { description: "{ status, reviews }" })] },
  {
    method: "post",
    path: "/life-cycles/:lifeCycleId/reviews",
    tag: "Review",
    summary: "Ask reviewers to review a snapshot",
    access: "editor",
    body: named("ReviewRequestCreate", ReviewRequestCreateSchema),
    responses: [created("The request.", { description: "The review request." })],
  },
  {
    method: "post",
    path: "/life-cycles/:lifeCycleId/reviews/decision",
    tag: "Review",
    summary: "Approve a snapshot or ask for changes, with a summary",
    access: "reviewer",
    body: named("ReviewDecision", ReviewDecisionSchema),
    responses: [ok("The decision.", { description: "The review with its decision." })],
  },
  { method: "get", path: "/account/notifications", tag: "Account", summary: "How you get e-mail about comments and reviews", access: "user", responses: [ok("Your setting.", { description: "{ mode }" })] },
  { method: "put", path: "/account/notifications", tag: "Account", summary: "E-mail as it happens, a daily digest, or none", access: "user", body: named("NotificationPreferences", NotificationPreferencesSchema), responses: [ok("Your setting.", { description: "{ mode }" })] },
  {
    method: "post",
    path: "/notifications/unsubscribe",
    tag: "Account",
    summary: "Turn notification e-mails off with the token from an e-mail's link (no sign-in); invitations are still sent",
    access: "public",
    body: named("Unsubscribe", UnsubscribeSchema),
    responses: [ok("E-mail stopped.", { description: "What was turned off." })],
  },

  // Snapshots
  { method: "get", path: "/life-cycles/:lifeCycleId/snapshots", tag: "Snapshots", summary: "Snapshots of a life cycle, newest first", access: "viewer", responses: [ok("Snapshots.", list(SnapshotSummary))] },
  { method: "post", path: "/life-cycles/:lifeCycleId/snapshots", tag: "Snapshots", summary: "Take a snapshot of the saved state", access: "editor", body: named("SnapshotCreate", SnapshotCreateSchema), responses: [created("The snapshot.", SnapshotSummary)] },
  { method: "get", path: "/snapshots/:snapshotId", tag: "Snapshots", summary: "A snapshot with its document", access: "viewer", responses: [ok("The snapshot.", named("Snapshot", SnapshotSchema))] },
  {
    method: "post",
    path: "/life-cycles/:lifeCycleId/snapshots/:snapshotId/restore",
    tag: "Snapshots",
    summary: "Make a snapshot the current state",
    access: "editor",
    body: named("SnapshotRestore", SnapshotRestoreSchema),
    responses: [ok("The life cycle as restored.", LifeCycleRecord)],
  },

  // Runs
  { method: "get", path: "/life-cycles/:lifeCycleId/runs", tag: "Runs", summary: "Runs of a life cycle, newest first", access: "viewer", responses: [ok("Runs (without results).", RunRecord)] },
  {
    method: "post",
    path: "/life-cycles/:lifeCycleId/runs",
    tag: "Runs",
    summary: "Start a Run (kind \"risk\": settings follow RiskSettings)",
    access: "editor",
    body: named("RunCreate", RunCreateSchema),
    responses: [created("The queued Run; poll GET /runs/{runId} for progress.", RunRecord)],
  },
  { method: "get", path: "/runs/:runId", tag: "Runs", summary: "A Run with its progress and, when finished, its result", access: "viewer", responses: [ok("The Run.", RunRecord)] },
  { method: "post", path: "/runs/:runId/cancel", tag: "Runs", summary: "Cancel a Run", access: "editor", responses: [ok("The Run.", RunRecord)] },

  { method: "get", path: "/dev/mail", tag: "Development", summary: "Messages caught by the local mail fake (development only)", access: "public", devOnly: true, responses: [ok("Caught messages.", list(named("MailMessage", MailMessageSchema)))] },
];
