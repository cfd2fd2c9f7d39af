import { useQuery } from '@tanstack/react-query';
import { apiFetch } from './api';

export interface UserSummary {
  id: string;
  displayName: string;
  email: string;
  role: string | null;
  lastSignInAt: string | null;
}

const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
};

export const useUsersQuery = () => useQuery({ queryKey: userKeys.list(), queryFn: () => apiFetch<{ items: UserSummary[] }>('/admin/users') });
