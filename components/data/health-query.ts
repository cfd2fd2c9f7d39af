import { useQuery } from '@tanstack/react-query';
import type { Health } from '../../shared/health';
import { apiFetch } from './api';

const healthKeys = { all: ['health'] as const };

/** Whether the server and its database answer; polled gently so the start page stays honest. */
export function useHealthQuery() {
  return useQuery({
    queryKey: healthKeys.all,
    queryFn: () => apiFetch<Health>('/health'),
    refetchInterval: 30_000,
    retry: 1,
  });
}
