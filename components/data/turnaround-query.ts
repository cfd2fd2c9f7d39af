import { useQuery } from '@tanstack/react-query';
import { apiFetch } from './api';
import type { StudySummary } from './study-query';

export interface WaitingStudy extends StudySummary {
  hoursWaiting: number;
  overdue: boolean;
}

export const turnaroundKeys = {
  all: ['turnaround'] as const,
  awaitingSignature: () => [...turnaroundKeys.all, 'awaiting-signature'] as const,
};

/** Unsigned studies with the hours each has waited since the procedure ended. */
export const useAwaitingSignatureQuery = () =>
  useQuery({
    queryKey: turnaroundKeys.awaitingSignature(),
    queryFn: () => apiFetch<{ targetHours: number; items: WaitingStudy[] }>('/turnaround/awaiting-signature'),
  });
