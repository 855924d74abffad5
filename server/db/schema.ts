import { sql } from "drizzle-orm";
import {
  bigserial,
  customType,
  doublePrecision,
  smallint,
  index,
  integer,
  jsonb,
  pgEnum,
  pgTable,
  primaryKey,
  text,
  timestamp,
  uniqueIndex,
  uuid,
  varchar,
  json,
} from "drizzle-orm/pg-core";
import { ROLES } from "../../shared/schemas/studies";

const createdAt = () => timestamp("created_at", { withTimezone: true }).notNull().defaultNow();

export const roleEnum = pgEnum("role", ROLES);
export const RUN_STATUSES = ["queued", "running", "succeeded", "failed", "cancelled"] as const;
export const runStatusEnum = pgEnum("run_status", RUN_STATUSES);

export const users = pgTable(
  "users",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    email: varchar("email", { length: 254 }).notNull(),
    name: varchar("name", { length: 100 }).notNull(),
    passwordHash: text("password_hash").notNull(),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("users_email_unique").on(t.email)],
);

/** express-session store (connect-pg-simple's layout), owned by Drizzle so migrations create it. */
export const sessions = pgTable(
  "session",
  {
    sid: varchar("sid").primaryKey(),
    sess: json("sess").notNull(),
    expire: timestamp("expire", { precision: 6 }).notNull(),
  },
  (t) => [index("IDX_session_expire").on(t.expire)],
);

export const studies = pgTable("studies", {
  id: uuid("id").primaryKey().defaultRandom(),
  name: varchar("name", { length: 120 }).notNull(),
  description: text("description").notNull().default(""),
  archivedAt: timestamp("archived_at", { withTimezone: true }),
  createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
  createdAt: createdAt(),
});

export const memberships = pgTable(
  "memberships",
  {
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    role: roleEnum("role").notNull(),
    createdAt: createdAt(),
  },
  (t) => [primaryKey({ columns: [t.studyId, t.userId] }), index("memberships_user_idx").on(t.userId)],
);

export const invitations = pgTable(
  "invitations",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    email: varchar("email", { length: 254 }).notNull(),
    role: roleEnum("role").notNull(),
    /** SHA-256 of the token in the link; the token itself is only in the e-mail. */
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    invitedBy: uuid("invited_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    acceptedAt: timestamp("accepted_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("invitations_token_unique").on(t.tokenHash), index("invitations_study_idx").on(t.studyId)],
);

export const passwordResets = pgTable(
  "password_resets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    createdAt: createdAt(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    usedAt: timestamp("used_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("password_resets_token_unique").on(t.tokenHash)],
);

/**
 * A sign-up waiting for its e-mailed link: the account is created only when
 * the link is opened, so sign-up answers the same whether or not the address
 * is registered (no user enumeration).
 */
export const signUpRequests = pgTable(
  "sign_up_requests",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    email: varchar("email", { length: 254 }).notNull(),
    name: varchar("name", { length: 100 }).notNull(),
    passwordHash: text("password_hash").notNull(),
    /** SHA-256 of the token in the link. */
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    /** The invitation the new account accepts when the link is opened. */
    invitationId: uuid("invitation_id").references(() => invitations.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    expiresAt: timestamp("expires_at", { withTimezone: true }).notNull(),
    usedAt: timestamp("used_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("sign_up_requests_token_unique").on(t.tokenHash), index("sign_up_requests_email_idx").on(t.email)],
);

export const apiTokens = pgTable(
  "api_tokens",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 100 }).notNull(),
    /** SHA-256 (hex) of the 32 random bytes handed to the user once. */
    tokenHash: varchar("token_hash", { length: 64 }).notNull(),
    createdAt: createdAt(),
    lastUsedAt: timestamp("last_used_at", { withTimezone: true }),
    revokedAt: timestamp("revoked_at", { withTimezone: true }),
    /** After this moment the token is refused (401); null: it never expires. */
    expiresAt: timestamp("expires_at", { withTimezone: true }),
    /** "read" (GET requests and the stateless analysis) or "read-write". Tokens made before scopes existed could write. */
    scope: varchar("scope", { length: 16 }).notNull().default("read-write"),
  },
  (t) => [uniqueIndex("api_tokens_hash_unique").on(t.tokenHash), index("api_tokens_user_idx").on(t.userId)],
);

/** Messages caught by the local SMTP fake (development and tests only). */
export const mailOutbox = pgTable("mail_outbox", {
  id: bigserial("id", { mode: "number" }).primaryKey(),
  to: text("to").notNull(),
  from: text("from").notNull(),
  subject: text("subject").notNull(),
  text: text("text").notNull(),
  raw: text("raw").notNull(),
  receivedAt: timestamp("received_at", { withTimezone: true }).notNull().defaultNow(),
});

export const auditEvents = pgTable(
  "audit_events",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    studyId: uuid("study_id").references(() => studies.id, { onDelete: "cascade" }),
    actorId: uuid("actor_id").references(() => users.id, { onDelete: "set null" }),
    action: varchar("action", { length: 64 }).notNull(),
    summary: text("summary").notNull(),
    details: jsonb("details").notNull().default(sql`'{}'::jsonb`),
    createdAt: createdAt(),
  },
  (t) => [index("audit_events_study_idx").on(t.studyId, t.createdAt)],
);

export const lifeCycles = pgTable(
  "life_cycles",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 200 }).notNull(),
    /** The life-cycle document (shared/lifecycle LifeCycleSchema), validated before every write. */
    document: jsonb("document").notNull(),
    schemaVersion: integer("schema_version").notNull(),
    /** Optimistic concurrency: a save must name the version it started from. */
    version: integer("version").notNull().default(1),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    updatedBy: uuid("updated_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
    /** Deleted life cycles stay recoverable for DELETED_LIFE_CYCLE_DAYS. */
    deletedAt: timestamp("deleted_at", { withTimezone: true }),
    deletedBy: uuid("deleted_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [index("life_cycles_study_idx").on(t.studyId)],
);

/** Immutable saved states of a life cycle. */
export const snapshots = pgTable(
  "snapshots",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    lifeCycleId: uuid("life_cycle_id")
      .notNull()
      .references(() => lifeCycles.id, { onDelete: "cascade" }),
    /** 1, 2, 3… within the life cycle. */
    number: integer("number").notNull(),
    message: text("message").notNull(),
    document: jsonb("document").notNull(),
    schemaVersion: integer("schema_version").notNull(),
    /** The life cycle's version the snapshot was taken at. */
    lifeCycleVersion: integer("life_cycle_version").notNull(),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
  },
  (t) => [uniqueIndex("snapshots_number_unique").on(t.lifeCycleId, t.number)],
);

/** A background computation, split into chunk jobs on the pg-boss queue. */
export const runs = pgTable(
  "runs",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    lifeCycleId: uuid("life_cycle_id").references(() => lifeCycles.id, { onDelete: "cascade" }),
    /** Runs on Field data (the λ bootstrap) name their dataset instead of a life cycle. */
    datasetId: uuid("dataset_id").references(() => datasets.id, { onDelete: "cascade" }),
    kind: varchar("kind", { length: 40 }).notNull(),
    /** Everything the run needs, frozen at start (documents included), so results can be reproduced. */
    input: jsonb("input").notNull(),
    /** The settings as the person entered them (shown when the run is reopened). */
    settings: jsonb("settings").notNull(),
    status: runStatusEnum("status").notNull().default("queued"),
    chunksTotal: integer("chunks_total").notNull(),
    chunksDone: integer("chunks_done").notNull().default(0),
    result: jsonb("result"),
    error: text("error"),
    createdBy: uuid("created_by").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    startedAt: timestamp("started_at", { withTimezone: true }),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [index("runs_life_cycle_idx").on(t.lifeCycleId, t.createdAt), index("runs_dataset_idx").on(t.datasetId, t.createdAt)],
);

/** One row per chunk: a finished chunk keeps its partial result and is never computed again. */
export const runChunks = pgTable(
  "run_chunks",
  {
    runId: uuid("run_id")
      .notNull()
      .references(() => runs.id, { onDelete: "cascade" }),
    chunkIndex: integer("chunk_index").notNull(),
    result: jsonb("result"),
    attempts: integer("attempts").notNull().default(0),
    finishedAt: timestamp("finished_at", { withTimezone: true }),
  },
  (t) => [primaryKey({ columns: [t.runId, t.chunkIndex] })],
);

/**
 * Review comments. A thread is its first comment (threadId null, with the
 * anchor and the resolved state); replies point at it with threadId.
 */
export const comments = pgTable(
  "comments",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    lifeCycleId: uuid("life_cycle_id")
      .notNull()
      .references(() => lifeCycles.id, { onDelete: "cascade" }),
    threadId: uuid("thread_id"),
    /** shared/schemas/review CommentAnchorSchema; on a thread's first comment only. */
    anchor: jsonb("anchor"),
    /** How the anchor read when the thread started ("arrow Eft → Subadult"), kept if it is later removed. */
    anchorLabel: text("anchor_label"),
    body: text("body").notNull(),
    /** User ids mentioned in the body (members when written). */
    mentions: jsonb("mentions").notNull().default(sql`'[]'::jsonb`),
    authorId: uuid("author_id").references(() => users.id, { onDelete: "set null" }),
    createdAt: createdAt(),
    editedAt: timestamp("edited_at", { withTimezone: true }),
    deletedAt: timestamp("deleted_at", { withTimezone: true }),
    resolvedAt: timestamp("resolved_at", { withTimezone: true }),
    resolvedBy: uuid("resolved_by").references(() => users.id, { onDelete: "set null" }),
  },
  (t) => [index("comments_life_cycle_idx").on(t.lifeCycleId, t.createdAt), index("comments_thread_idx").on(t.threadId)],
);

export const REVIEW_STATES = ["requested", "approved", "changes_requested"] as const;
export const reviewStateEnum = pgEnum("review_state", REVIEW_STATES);

/** One reviewer's review of one snapshot: asked for (requestedBy) and/or decided. */
export const reviews = pgTable(
  "reviews",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    lifeCycleId: uuid("life_cycle_id")
      .notNull()
      .references(() => lifeCycles.id, { onDelete: "cascade" }),
    snapshotId: uuid("snapshot_id")
      .notNull()
      .references(() => snapshots.id, { onDelete: "cascade" }),
    reviewerId: uuid("reviewer_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    requestedBy: uuid("requested_by").references(() => users.id, { onDelete: "set null" }),
    message: text("message").notNull().default(""),
    state: reviewStateEnum("state").notNull().default("requested"),
    summary: text("summary").notNull().default(""),
    createdAt: createdAt(),
    decidedAt: timestamp("decided_at", { withTimezone: true }),
  },
  (t) => [uniqueIndex("reviews_snapshot_reviewer_unique").on(t.snapshotId, t.reviewerId), index("reviews_life_cycle_idx").on(t.lifeCycleId)],
);

export const NOTIFICATION_MODES = ["immediate", "digest", "off"] as const;
export const notificationModeEnum = pgEnum("notification_mode", NOTIFICATION_MODES);

/** How a person wants their e-mail (no row: immediate). */
export const notificationPreferences = pgTable("notification_preferences", {
  userId: uuid("user_id")
    .primaryKey()
    .references(() => users.id, { onDelete: "cascade" }),
  mode: notificationModeEnum("mode").notNull(),
  updatedAt: timestamp("updated_at", { withTimezone: true }).notNull().defaultNow(),
});

/**
 * Notification outbox: written in the transaction of the change that causes
 * it, sent after the commit (immediate) or by the daily digest job.
 */
export const notifications = pgTable(
  "notifications",
  {
    id: bigserial("id", { mode: "number" }).primaryKey(),
    userId: uuid("user_id")
      .notNull()
      .references(() => users.id, { onDelete: "cascade" }),
    kind: varchar("kind", { length: 40 }).notNull(),
    /** The recipient's mode when it was written. */
    mode: notificationModeEnum("mode").notNull(),
    subject: text("subject").notNull(),
    text: text("text").notNull(),
    link: text("link").notNull(),
    createdAt: createdAt(),
    sentAt: timestamp("sent_at", { withTimezone: true }),
  },
  (t) => [index("notifications_unsent_idx").on(t.userId, t.sentAt)],
);

const bytea = customType<{ data: Buffer; driverData: Buffer }>({ dataType: () => "bytea" });

/** An uploaded Field-data file: the raw bytes as sent, who sent it, and how its columns were read. */
export const datasets = pgTable(
  "datasets",
  {
    id: uuid("id").primaryKey().defaultRandom(),
    studyId: uuid("study_id")
      .notNull()
      .references(() => studies.id, { onDelete: "cascade" }),
    name: varchar("name", { length: 120 }).notNull(),
    /** "counts" | "stage-fates". */
    kind: varchar("kind", { length: 20 }).notNull(),
    fileName: varchar("file_name", { length: 255 }).notNull(),
    fileBytes: integer("file_bytes").notNull(),
    fileContent: bytea("file_content").notNull(),
    rowCount: integer("row_count").notNull(),
    /** Column mapping and parse options (delimiter, decimal comma, dead value, stage order) as used. */
    mapping: jsonb("mapping").notNull(),
    options: jsonb("options").notNull(),
    stages: jsonb("stages").$type<string[]>().notNull(),
    sites: jsonb("sites").$type<string[]>().notNull(),
    firstYear: doublePrecision("first_year"),
    lastYear: doublePrecision("last_year"),
    uploadedBy: uuid("uploaded_by").references(() => users.id, { onDelete: "set null" }),
    uploadedAt: createdAt(),
  },
  (t) => [index("datasets_study_idx").on(t.studyId, t.uploadedAt)],
);

/** One census of a counts dataset (line = line of the uploaded file). */
export const countRows = pgTable(
  "count_rows",
  {
    datasetId: uuid("dataset_id")
      .notNull()
      .references(() => datasets.id, { onDelete: "cascade" }),
    line: integer("line").notNull(),
    site: text("site").notNull(),
    /** Census time in years (a date becomes year + day/365). */
    time: doublePrecision("time").notNull(),
    label: text("label").notNull(),
    count: doublePrecision("count").notNull(),
    /** Per-stage counts by stage name, when mapped. */
    stageCounts: jsonb("stage_counts").$type<Record<string, number | null>>(),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.line] })],
);

/** One individual at one census of a stage-fate dataset; stage and fate index the dataset's `stages` (fate −1 dead, −2 unknown). */
export const fateRows = pgTable(
  "fate_rows",
  {
    datasetId: uuid("dataset_id")
      .notNull()
      .references(() => datasets.id, { onDelete: "cascade" }),
    line: integer("line").notNull(),
    site: text("site").notNull(),
    individual: text("individual").notNull(),
    year: doublePrecision("year").notNull(),
    stage: smallint("stage").notNull(),
    fate: smallint("fate").notNull(),
    offspring: doublePrecision("offspring"),
  },
  (t) => [primaryKey({ columns: [t.datasetId, t.line] })],
);
