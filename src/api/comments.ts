/**
 * Review comments of a life cycle: threads anchored to a stage, arrow, rate,
 * matrix cell, snapshot or the whole life cycle, with replies; edit, delete,
 * resolve and reopen.
 */
import { queryOptions, useMutation, useQuery, useQueryClient } from "@tanstack/react-query";
import type { CommentCreate, CommentReply, CommentThread, CommentUpdate } from "../../shared/schemas/review";
import { api, segment } from "./client";
import { queryKeys } from "./keys";

export type { CommentThread };

export const fetchComments = (lifeCycleId: string, signal?: AbortSignal) =>
  api.get<CommentThread[]>(`/life-cycles/${segment(lifeCycleId)}/comments`, signal);

export const commentsQueryOptions = (lifeCycleId: string) =>
  queryOptions({
    queryKey: queryKeys.lifeCycles.comments(lifeCycleId),
    queryFn: ({ signal }) => fetchComments(lifeCycleId, signal),
    // Others comment while you read: look again now and then.
    refetchInterval: 30_000,
  });

export function useComments(lifeCycleId: string) {
  return useQuery(commentsQueryOptions(lifeCycleId));
}

type CommentAction =
  | { kind: "create"; body: CommentCreate }
  | { kind: "reply"; commentId: string; body: CommentReply }
  | { kind: "edit"; commentId: string; body: CommentUpdate }
  | { kind: "delete"; commentId: string }
  | { kind: "resolve"; commentId: string }
  | { kind: "reopen"; commentId: string };

export function sendCommentAction(lifeCycleId: string, action: CommentAction): Promise<CommentThread | void> {
  switch (action.kind) {
    case "create":
      return api.post<CommentThread>(`/life-cycles/${segment(lifeCycleId)}/comments`, action.body);
    case "reply":
      return api.post<CommentThread>(`/comments/${segment(action.commentId)}/replies`, action.body);
    case "edit":
      return api.patch<CommentThread>(`/comments/${segment(action.commentId)}`, action.body);
    case "delete":
      return api.delete(`/comments/${segment(action.commentId)}`);
    case "resolve":
      return api.post<CommentThread>(`/comments/${segment(action.commentId)}/resolve`);
    case "reopen":
      return api.post<CommentThread>(`/comments/${segment(action.commentId)}/reopen`);
  }
}

/** Every change to a comment refreshes the life cycle's threads (and the Study's activity). */
export function useCommentAction(lifeCycleId: string, studyId: string) {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (action: CommentAction) => sendCommentAction(lifeCycleId, action),
    onSettled: () =>
      Promise.all([
        queryClient.invalidateQueries({ queryKey: queryKeys.lifeCycles.comments(lifeCycleId) }),
        queryClient.invalidateQueries({ queryKey: queryKeys.studies.activity(studyId) }),
      ]),
  });
}
