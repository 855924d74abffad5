/**
 * Projections of a life cycle from an initial population the person enters
 * (POST /analyze with `initial`). The editor's document may be unsaved, so
 * the request sends the document itself; the query is keyed by a fingerprint
 * of it, so an unchanged model is not analysed twice.
 */
import { keepPreviousData, queryOptions, useQuery } from "@tanstack/react-query";
import type { LifeCycle } from "../../shared/lifecycle";
import type { LifeCycleAnalysis } from "../../shared/schemas/life-cycles";
import { api } from "./client";
import { queryKeys } from "./keys";

/** A short fingerprint of a document (FNV-1a over its JSON, plus the length). */
export function documentFingerprint(document: LifeCycle): string {
  const text = JSON.stringify(document);
  let h = 0x811c9dc5;
  for (let i = 0; i < text.length; i++) {
    h ^= text.charCodeAt(i);
    h = Math.imul(h, 0x01000193);
  }
  return `${(h >>> 0).toString(36)}-${text.length.toString(36)}`;
}

export const fetchProjection = (document: LifeCycle, initial: readonly number[], steps: number) =>
  api.post<LifeCycleAnalysis>("/analyze", { document, initial, projectionSteps: steps });

export const projectionQueryOptions = (document: LifeCycle, fingerprint: string, initial: readonly number[], steps: number) =>
  queryOptions({
    queryKey: queryKeys.analyze.projection(fingerprint, initial, steps),
    queryFn: () => fetchProjection(document, initial, steps),
    staleTime: Infinity,
    gcTime: 5 * 60_000,
    placeholderData: keepPreviousData,
    retry: false,
  });

/** The projection of `document` from `initial` over `steps` time steps; idle while `initial` is null. */
export function useProjection(document: LifeCycle, initial: readonly number[] | null, steps: number) {
  const fingerprint = initial === null ? "" : documentFingerprint(document);
  return useQuery({ ...projectionQueryOptions(document, fingerprint, initial ?? [], steps), enabled: initial !== null });
}
