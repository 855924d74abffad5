/**
 * Every TanStack Query key of the client, in one prefix hierarchy. A key is a
 * prefix of everything beneath it, so invalidating `studies.detail(id)` also
 * refreshes that Study's members, invitations, activity and life cycles.
 * Build keys here; never retype them elsewhere.
 */
export const queryKeys = {
  session: ["session"] as const,

  account: {
    all: ["account"] as const,
    tokens: () => [...queryKeys.account.all, "tokens"] as const,
    /** How the person wants their e-mail (immediate, digest, off). */
    notifications: () => [...queryKeys.account.all, "notifications"] as const,
  },

  studies: {
    all: ["studies"] as const,
    list: () => [...queryKeys.studies.all, "list"] as const,
    detail: (studyId: string) => [...queryKeys.studies.all, "detail", studyId] as const,
    members: (studyId: string) => [...queryKeys.studies.detail(studyId), "members"] as const,
    invitations: (studyId: string) => [...queryKeys.studies.detail(studyId), "invitations"] as const,
    activity: (studyId: string) => [...queryKeys.studies.detail(studyId), "activity"] as const,
    /** One filtered view of the activity log (filters as sent, paging included). */
    activityLog: (studyId: string, filters: Record<string, string>) => [...queryKeys.studies.activity(studyId), "log", filters] as const,
    lifeCycles: (studyId: string) => [...queryKeys.studies.detail(studyId), "life-cycles"] as const,
    deletedLifeCycles: (studyId: string) => [...queryKeys.studies.detail(studyId), "deleted-life-cycles"] as const,
    datasets: (studyId: string) => [...queryKeys.studies.detail(studyId), "datasets"] as const,
  },

  /** Field-data datasets and their analyses; invalidating `detail(id)` refreshes everything of one dataset. */
  datasets: {
    all: ["datasets"] as const,
    detail: (datasetId: string) => [...queryKeys.datasets.all, datasetId] as const,
    countsAnalysis: (datasetId: string, query: object) => [...queryKeys.datasets.detail(datasetId), "counts", query] as const,
    fateAnalysis: (datasetId: string, settings: object) => [...queryKeys.datasets.detail(datasetId), "fates", settings] as const,
    runs: (datasetId: string) => [...queryKeys.datasets.detail(datasetId), "runs"] as const,
  },

  /** One life cycle and what hangs off it; invalidating `detail(id)` refreshes its analysis and snapshots too. */
  lifeCycles: {
    all: ["life-cycles"] as const,
    detail: (lifeCycleId: string) => [...queryKeys.lifeCycles.all, lifeCycleId] as const,
    /** The analysis of the saved document (GET /life-cycles/:id/analysis). */
    analysis: (lifeCycleId: string) => [...queryKeys.lifeCycles.detail(lifeCycleId), "analysis"] as const,
    /** The live analysis of the editor's unsaved document at one of its revisions (POST /analyze). */
    draftAnalysis: (lifeCycleId: string, revision: number) => [...queryKeys.lifeCycles.analysis(lifeCycleId), "draft", revision] as const,
    snapshots: (lifeCycleId: string) => [...queryKeys.lifeCycles.detail(lifeCycleId), "snapshots"] as const,
    /** Levers of the editor's document at one revision (POST /levers). */
    levers: (lifeCycleId: string, revision: number, relativeChange: number, target: number, breakEven: boolean) =>
      [...queryKeys.lifeCycles.detail(lifeCycleId), "levers", revision, relativeChange, target, breakEven] as const,
    /** LTRE of another life cycle against the editor's document at one revision (POST /ltre). */
    ltre: (lifeCycleId: string, revision: number, comparisonId: string) => [...queryKeys.lifeCycles.detail(lifeCycleId), "ltre", revision, comparisonId] as const,
    /** The life cycle's Runs, newest first (GET /life-cycles/:id/runs). */
    runs: (lifeCycleId: string) => [...queryKeys.lifeCycles.detail(lifeCycleId), "runs"] as const,
    /** Review comment threads with their replies (GET /life-cycles/:id/comments). */
    comments: (lifeCycleId: string) => [...queryKeys.lifeCycles.detail(lifeCycleId), "comments"] as const,
    /** Review requests, decisions and the review status (GET /life-cycles/:id/reviews). */
    reviews: (lifeCycleId: string) => [...queryKeys.lifeCycles.detail(lifeCycleId), "reviews"] as const,
    /** The report of the saved state (snapshot null) or of one snapshot. */
    report: (lifeCycleId: string, snapshotId: string | null) => [...queryKeys.lifeCycles.detail(lifeCycleId), "report", snapshotId] as const,
  },

  /** Runs by id: status and progress while they compute, then their result. */
  runs: {
    all: ["runs"] as const,
    detail: (runId: string) => [...queryKeys.runs.all, runId] as const,
  },

  /** Snapshots by id (immutable: their documents never change). */
  snapshots: {
    all: ["snapshots"] as const,
    detail: (snapshotId: string) => [...queryKeys.snapshots.all, snapshotId] as const,
  },

  /** Stateless analyses (POST /analyze), keyed by a fingerprint of the document and the options. */
  analyze: {
    all: ["analyze"] as const,
    projection: (documentFingerprint: string, initial: readonly number[], steps: number) =>
      [...queryKeys.analyze.all, "projection", documentFingerprint, initial, steps] as const,
  },

  /** Climate computations (stateless POSTs), keyed by a fingerprint of the document and their options. */
  climate: {
    all: ["climate"] as const,
    lambda: (documentFingerprint: string, min: number, max: number, at: number | null) => [...queryKeys.climate.all, "lambda", documentFingerprint, min, max, at] as const,
    trajectory: (fingerprint: string, initialTotal: number) => [...queryKeys.climate.all, "trajectory", fingerprint, initialTotal] as const,
  },

  /** Invitation previews are read before sign-in, keyed by their link token. */
  invitations: {
    all: ["invitations"] as const,
    preview: (token: string) => [...queryKeys.invitations.all, token] as const,
  },

  devMail: ["dev", "mail"] as const,

  /** The OpenAPI document (public, the same for everyone). */
  openApi: ["openapi"] as const,
};
