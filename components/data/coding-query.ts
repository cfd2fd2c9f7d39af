import { useQuery } from '@tanstack/react-query';
import { apiFetch } from './api';
import type { StudySummary } from './study-query';

export const codingKeys = {
  all: ['coding'] as const,
  queue: () => [...codingKeys.all, 'queue'] as const,
};

/** Signed studies waiting for code review, oldest first. */
export const useCodingQueueQuery = () => useQuery({ queryKey: codingKeys.queue(), queryFn: () => apiFetch<{ items: StudySummary[] }>('/coding/queue') });
