/** Reports of life cycles (JSON for the page, PDF made on the server) and the Study zip. */
import { queryOptions, useMutation, useQuery } from "@tanstack/react-query";
import type { LifeCycleReport } from "../../shared/report/model";
import type { Paper } from "../../shared/schemas/report";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

const query = (params: Record<string, string | null | undefined>) => {
  const q = new URLSearchParams();
  for (const [k, v] of Object.entries(params)) if (v) q.set(k, v);
  const s = q.toString();
  return s ? `?${s}` : "";
};

export const fetchReport = (lifeCycleId: string, snapshotId: string | null, signal?: AbortSignal) =>
  api.get<LifeCycleReport>(`/life-cycles/${segment(lifeCycleId)}/report${query({ snapshot: snapshotId })}`, signal);

export const reportQueryOptions = (lifeCycleId: string, snapshotId: string | null) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.report(lifeCycleId, snapshotId),
    queryFn: ({ signal }) => fetchReport(lifeCycleId, snapshotId, signal),
  });

export function useReport(lifeCycleId: string, snapshotId: string | null) {
  return useQuery(reportQueryOptions(lifeCycleId, snapshotId));
}

export const downloadReportPdf = ({ lifeCycleId, snapshotId, paper }: { lifeCycleId: string; snapshotId: string | null; paper: Paper }) =>
  api.file(`/life-cycles/${segment(lifeCycleId)}/report.pdf${query({ snapshot: snapshotId, paper })}`, "report.pdf");

export function useDownloadReportPdf() {
  return useMutation({ mutationFn: downloadReportPdf });
}

export const downloadStudyZip = (studyId: string) => api.file(`/studies/${segment(studyId)}/export.zip`, "study.zip");

export function useDownloadStudyZip() {
  return useMutation({ mutationFn: downloadStudyZip });
}
