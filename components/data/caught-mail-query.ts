import { useQuery } from '@tanstack/react-query';
import type { CaughtMessage } from '../../shared/mail/caught';
import { apiFetch } from './api';

/** Mail the local mail stand-in caught (development and tests only; 404 elsewhere). */
export function useCaughtMail(enabled = true) {
  return useQuery({
    queryKey: ['dev', 'caught-mail'],
    queryFn: () => apiFetch<{ items: CaughtMessage[] }>('/dev/caught-mail'),
    enabled,
    retry: false,
    // New mail shows up while the page is open; a server without the stand-in is not asked again.
    refetchInterval: (query) => (query.state.error ? false : 5000),
  });
}
