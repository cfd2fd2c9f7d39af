import { useQuery } from '@tanstack/react-query';
import type { AwaitingSignature } from '../../shared/study/awaiting-signature';
import { apiFetch } from './api';

/** Under the studies key, so any change to a study (a save, a signature) reads the lists again. */
const awaitingKeys = { all: ['studies', 'awaiting-signature'] as const };

/** Studies awaiting signature, oldest first: the signed-in physician's own, and all of them. */
export function useAwaitingSignature(enabled = true) {
  return useQuery({ queryKey: awaitingKeys.all, queryFn: () => apiFetch<AwaitingSignature>('/awaiting-signature'), enabled, refetchInterval: 60_000 });
}
