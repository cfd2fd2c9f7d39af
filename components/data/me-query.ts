import { queryOptions, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { Me } from '../../shared/auth/users';
import { apiFetch, ApiError } from './api';
import { announceSignOut, clearAllDrafts, unsentStudies } from '../study/draft-store';

const meKeys = { all: ['me'] as const };

/** The signed-in user; a 401 means signed out (not an error worth retrying). */
export const meQueryOptions = () =>
  queryOptions({
    queryKey: meKeys.all,
    queryFn: () => apiFetch<Me>('/me'),
    retry: (count, error) => !(error instanceof ApiError && (error.status === 401 || error.status === 403)) && count < 2,
    staleTime: 60_000,
  });

export function useMeQuery() {
  return useQuery(meQueryOptions());
}

/**
 * Ends the session at Isobar, forgets every cached record and every unsent draft on this device (a lab
 * workstation is shared), then lets the provider end its session. Unsent edits are named first.
 */
export function useSignOut() {
  const queryClient = useQueryClient();
  const mutation = useMutation({
    mutationFn: () => apiFetch<{ redirect: string }>('/auth/sign-out', { method: 'POST' }),
    onSuccess: ({ redirect }) => {
      queryClient.clear();
      clearAllDrafts();
      announceSignOut();
      if (typeof window !== 'undefined') window.location.replace(redirect);
    },
  });
  const signOut = () => {
    const me = queryClient.getQueryData<Me>(meKeys.all);
    const unsent = me ? unsentStudies(me.id).length : 0;
    if (unsent && typeof window !== 'undefined' && typeof window.confirm === 'function') {
      const ok = window.confirm(
        `${unsent === 1 ? 'One study has' : `${unsent} studies have`} changes on this device that the server has not received yet. Sign out anyway and discard them?`,
      );
      if (!ok) return;
    }
    mutation.mutate();
  };
  return { ...mutation, mutate: signOut };
}

/** Full-page navigation to the server's sign-in route (it redirects to the identity provider). */
export function startSignIn(returnTo?: string) {
  const query = returnTo && returnTo !== '/' ? `?returnTo=${encodeURIComponent(returnTo)}` : '';
  if (typeof window !== 'undefined') window.location.assign(`/api/auth/sign-in${query}`);
}
