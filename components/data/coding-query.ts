import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AddCode, CodingQueueQuery, DecideCode, QueueItem, ReviewView } from '../../shared/coding/review';
import { apiFetch } from './api';

export type QueueFilters = Partial<Pick<CodingQueueQuery, 'operatorId' | 'from' | 'to' | 'status'>>;

const codingKeys = {
  all: ['coding'] as const,
  queues: () => [...codingKeys.all, 'queue'] as const,
  queue: (filters: QueueFilters) => [...codingKeys.queues(), filters] as const,
  review: (studyId: string) => [...codingKeys.all, 'review', studyId] as const,
};

const queryString = (params: Record<string, string | undefined>) => {
  const entries = Object.entries(params).filter(([, v]) => v) as [string, string][];
  return entries.length ? `?${new URLSearchParams(entries).toString()}` : '';
};

/** Studies whose codes await review (or in the status asked for), oldest first. */
export const useCodingQueue = (filters: QueueFilters = {}) =>
  useQuery({ queryKey: codingKeys.queue(filters), queryFn: () => apiFetch<{ items: QueueItem[] }>(`/coding/queue${queryString(filters)}`) });

/** One study's code review. */
export const useCodingReview = (studyId: string) =>
  useQuery({ queryKey: codingKeys.review(studyId), queryFn: () => apiFetch<ReviewView>(`/coding/studies/${studyId}`) });

/** Each change answers with the whole review: it replaces the cached one, and the queue is refreshed. */
function useReviewMutation<T>(studyId: string, path: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: T) => apiFetch<ReviewView>(`/coding/studies/${studyId}/${path}`, { method: 'POST', body: JSON.stringify(body) }),
    onSuccess: (review) => {
      client.setQueryData(codingKeys.review(studyId), review);
      void client.invalidateQueries({ queryKey: codingKeys.queues() });
    },
  });
}

export const useDecideCode = (studyId: string) => useReviewMutation<DecideCode>(studyId, 'decisions');
export const useAddCode = (studyId: string) => useReviewMutation<AddCode>(studyId, 'codes');
export const useCompleteReview = (studyId: string) => useReviewMutation<{ setId: string }>(studyId, 'complete');
