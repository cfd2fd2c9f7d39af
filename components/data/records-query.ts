import { useQuery } from '@tanstack/react-query';
import { apiFetch } from './api';
import type { WorklistItem } from '../../shared/study/worklist';

/** A study as lists show it: the same shape for the worklist, the coding queue and turnaround. */
export type StudySummary = WorklistItem;

export interface WaitingStudy extends StudySummary {
  hoursWaiting: number;
  overdue: boolean;
}

export interface UserSummary {
  id: string;
  displayName: string;
  email: string;
  role: string | null;
  lastSignInAt: string | null;
}

export const recordKeys = {
  worklist: ['studies', 'list'] as const,
  awaitingSignature: ['turnaround', 'awaiting-signature'] as const,
  users: ['admin', 'users'] as const,
  audit: ['audit-events'] as const,
};

export const useWorklistQuery = () =>
  useQuery({ queryKey: recordKeys.worklist, queryFn: () => apiFetch<{ items: StudySummary[] }>('/studies') });

export const useAwaitingSignatureQuery = () =>
  useQuery({
    queryKey: recordKeys.awaitingSignature,
    queryFn: () => apiFetch<{ targetHours: number; items: WaitingStudy[] }>('/turnaround/awaiting-signature'),
  });

export const useUsersQuery = () => useQuery({ queryKey: recordKeys.users, queryFn: () => apiFetch<{ items: UserSummary[] }>('/admin/users') });

export interface AuditEventResource {
  id: string;
  recorded: string;
  action: string;
  outcome: string;
  outcomeDesc?: string;
  type: { display?: string };
  agent: { who?: { display?: string }; role?: { text?: string }[]; network?: { address?: string } }[];
  entity?: { what?: { display?: string; identifier?: { value?: string } } }[];
}

export const useAuditEventsQuery = () =>
  useQuery({
    queryKey: recordKeys.audit,
    queryFn: () => apiFetch<{ entry?: { resource: AuditEventResource }[] }>('/audit-events?limit=100'),
  });
