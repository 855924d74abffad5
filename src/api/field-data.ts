/**
 * Field data: the Study's datasets (uploads of census counts and stage-fate
 * records), the upload steps (preview, check, import), the two analyses, a
 * life cycle started from estimates, and the λ bootstrap Runs of a dataset.
 */
import { keepPreviousData, queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import { useEffect } from "react";
import type { z } from "zod";
import type { CountsAnalysis, StageFateEstimate } from "../../shared/fielddata";
import type {
  BootstrapRunResult,
  BootstrapSettingsSchema,
  CountsAnalysisQuery,
  CountsAnalysisResult,
  DatasetKind,
  DatasetRename,
  DatasetSummary,
  FateAnalysisResult,
  FateAnalysisSettings,
  FateGroup,
  PreviewSchema,
  SiteSeries,
  StartLifeCycle,
  UploadPreview,
  UploadSchema,
  ValidationReport,
} from "../../shared/schemas/field-data";
import type { LifeCycleRecord } from "../../shared/schemas/life-cycles";
import type { RunRecord, RunStatus, RunSummary } from "../../shared/schemas/runs";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type {
  BootstrapRunResult,
  CountsAnalysis,
  CountsAnalysisResult,
  DatasetKind,
  DatasetSummary,
  FateAnalysisResult,
  FateAnalysisSettings,
  FateGroup,
  SiteSeries,
  StageFateEstimate,
  UploadPreview,
  ValidationReport,
};

// ------------------------------------------------------------------ datasets

export const datasetsQueryOptions = (studyId: string) =>
  queryOptions({
    queryKey: queryKeys.studies.datasets(studyId),
    queryFn: ({ signal }) => api.get<DatasetSummary[]>(`/studies/${segment(studyId)}/datasets`, signal),
  });

export function useDatasets(studyId: string) {
  return useQuery(datasetsQueryOptions(studyId));
}

export const datasetQueryOptions = (datasetId: string) =>
  queryOptions({
    queryKey: queryKeys.datasets.detail(datasetId),
    queryFn: ({ signal }) => api.get<DatasetSummary>(`/datasets/${segment(datasetId)}`, signal),
  });

export function useDataset(datasetId: string) {
  return useQuery(datasetQueryOptions(datasetId));
}

/** Where the raw file can be downloaded (a plain link: the browser sends the session cookie). */
export const datasetFileUrl = (datasetId: string) => `/api/v1/datasets/${segment(datasetId)}/file`;

export function useRenameDataset(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: ({ id, name }: { id: string } & DatasetRename) => api.patch<DatasetSummary>(`/datasets/${segment(id)}`, { name }),
    onSuccess: (d) => {
      queryClient.setQueryData(queryKeys.datasets.detail(d.id), d);
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId) });
    },
  });
}

export function useDeleteDataset(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (id: string) => api.delete(`/datasets/${segment(id)}`),
    onSuccess: (_v, id) => {
      queryClient.removeQueries({ queryKey: queryKeys.datasets.detail(id) });
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId) });
    },
  });
}

// -------------------------------------------------------------------- upload

/** The file and the fields of UploadSchema sent with it (multipart; `mapping` and `options` as JSON). */
export type UploadParts = { file: File } & z.input<typeof UploadSchema>;

function form(parts: { file: File } & Partial<z.input<typeof UploadSchema>>): FormData {
  const f = new FormData();
  if (parts.kind) f.set("kind", parts.kind);
  if (parts.name !== undefined) f.set("name", parts.name);
  if (parts.mapping) f.set("mapping", JSON.stringify(parts.mapping));
  if (parts.options) f.set("options", JSON.stringify(parts.options));
  if (parts.file) f.set("file", parts.file, parts.file.name);
  return f;
}

export function usePreviewUpload(studyId: string) {
  return useMutation({
    mutationFn: (parts: { file: File } & z.input<typeof PreviewSchema>) => api.postForm<UploadPreview>(`/studies/${segment(studyId)}/datasets/preview`, form(parts)),
  });
}

/** The validation report of the whole file; nothing is stored. */
export function useCheckUpload(studyId: string) {
  return useMutation({
    mutationFn: (parts: UploadParts) => api.postForm<ValidationReport>(`/studies/${segment(studyId)}/datasets/check`, form(parts)),
  });
}

/** Stores the file and its rows; a file with any problem is refused whole (400 with `report`). */
export function useUploadDataset(studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (parts: UploadParts) => api.postForm<DatasetSummary>(`/studies/${segment(studyId)}/datasets`, form(parts)),
    onSuccess: (d) => {
      queryClient.setQueryData(queryKeys.datasets.detail(d.id), d);
      return queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId) });
    },
  });
}

// ------------------------------------------------------------------ analyses

const query = (o: Record<string, unknown>) => {
  const p = new URLSearchParams();
  for (const [k, v] of Object.entries(o)) if (v !== undefined && v !== null && v !== "") p.set(k, String(v));
  const s = p.toString();
  return s ? `?${s}` : "";
};

export function useCountsAnalysis(datasetId: string, q: CountsAnalysisQuery) {
  return useQuery({
    queryKey: queryKeys.datasets.countsAnalysis(datasetId, q),
    queryFn: ({ signal }) => api.get<CountsAnalysisResult>(`/datasets/${segment(datasetId)}/counts-analysis${query({ ...q })}`, signal),
    placeholderData: keepPreviousData,
  });
}

export function useFateAnalysis(datasetId: string, settings: FateAnalysisSettings) {
  return useQuery({
    queryKey: queryKeys.datasets.fateAnalysis(datasetId, settings),
    queryFn: ({ signal }) => api.get<FateAnalysisResult>(`/datasets/${segment(datasetId)}/fate-analysis${query({ ...settings })}`, signal),
    placeholderData: keepPreviousData,
  });
}

export function useStartLifeCycle(datasetId: string, studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (body: StartLifeCycle) => api.post<LifeCycleRecord>(`/datasets/${segment(datasetId)}/life-cycles`, body),
    onSuccess: () => queryClient.invalidateQueries({ queryKey: queryKeys.studies.detail(studyId) }),
  });
}

// --------------------------------------------------------------- bootstrap

export type BootstrapRun = RunRecord<BootstrapRunResult>;
export const isActive = (status: RunStatus) => status === "queued" || status === "running";
const RUN_POLL_MS = 500;

export function useDatasetRuns(datasetId: string) {
  return useQuery({
    queryKey: queryKeys.datasets.runs(datasetId),
    queryFn: ({ signal }) => api.get<RunSummary[]>(`/datasets/${segment(datasetId)}/runs`, signal),
    refetchInterval: (q) => (q.state.data?.some((r) => isActive(r.status)) ? 2000 : false),
  });
}

/** One bootstrap Run, polled while it computes; the dataset's list refreshes when it ends. */
export function useBootstrapRun(datasetId: string, runId: string | null) {
  const queryClient = useQueryClient();
  const q = useQuery({
    queryKey: queryKeys.runs.detail(runId ?? ""),
    queryFn: ({ signal }) => api.get<BootstrapRun>(`/runs/${segment(runId ?? "")}`, signal),
    enabled: runId !== null,
    refetchInterval: (query) => (query.state.data && !isActive(query.state.data.status)) || query.state.error ? false : RUN_POLL_MS,
  });
  const status = q.data?.status;
  useEffect(() => {
    if (status !== undefined && !isActive(status)) void queryClient.invalidateQueries({ queryKey: queryKeys.datasets.runs(datasetId) });
  }, [status, datasetId, queryClient]);
  return q;
}

export function useStartBootstrap(datasetId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (settings: z.input<typeof BootstrapSettingsSchema>) => api.post<BootstrapRun>(`/datasets/${segment(datasetId)}/runs`, { kind: "bootstrap", settings }),
    onSuccess: (run) => {
      queryClient.setQueryData(queryKeys.runs.detail(run.id), run);
      return queryClient.invalidateQueries({ queryKey: queryKeys.datasets.runs(datasetId) });
    },
  });
}

export function useCancelBootstrap(datasetId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (runId: string) => api.post<BootstrapRun>(`/runs/${segment(runId)}/cancel`),
    onSettled: (_r, _e, runId) =>
      Promise.all([queryClient.invalidateQueries({ queryKey: queryKeys.runs.detail(runId) }), queryClient.invalidateQueries({ queryKey: queryKeys.datasets.runs(datasetId) })]),
  });
}
