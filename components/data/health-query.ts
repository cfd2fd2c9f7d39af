import { useQuery } from '@tanstack/react-query';
import { apiFetch } from './api';

export interface Health {
  status: 'ok';
  database: 'up';
  time: string;
}

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
