/** Reviews of a life cycle's snapshots: requests, decisions and the resulting status. */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { LifeCycleReviews, ReviewDecision, ReviewRequestCreate } from "../../shared/schemas/review";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type { LifeCycleReviews };

const reviewsPath = (lifeCycleId: string) => `/life-cycles/${segment(lifeCycleId)}/reviews`;

export const fetchReviews = (lifeCycleId: string, signal?: AbortSignal) => api.get<LifeCycleReviews>(reviewsPath(lifeCycleId), signal);

export const reviewsQueryOptions = (lifeCycleId: string) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.reviews(lifeCycleId),
    queryFn: ({ signal }) => fetchReviews(lifeCycleId, signal),
  });

export function useReviews(lifeCycleId: string) {
  return useQuery(reviewsQueryOptions(lifeCycleId));
}

function useReviewMutation<T>(lifeCycleId: string, studyId: string, send: (body: T) => Promise<LifeCycleReviews>) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: send,
    onSuccess: (data) => queryClient.setQueryData(queryKeys.lifeCycles.reviews(lifeCycleId), data),
    onSettled: () => queryClient.invalidateQueries({ queryKey: queryKeys.studies.activity(studyId) }),
  });
}

export function useRequestReview(lifeCycleId: string, studyId: string) {
  return useReviewMutation(lifeCycleId, studyId, (body: ReviewRequestCreate) => api.post<LifeCycleReviews>(reviewsPath(lifeCycleId), body));
}

export function useDecideReview(lifeCycleId: string, studyId: string) {
  return useReviewMutation(lifeCycleId, studyId, (body: ReviewDecision) => api.post<LifeCycleReviews>(`${reviewsPath(lifeCycleId)}/decision`, body));
}
