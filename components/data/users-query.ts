import { useQuery } from '@tanstack/react-query';
import type { UserList } from '../../shared/auth/users';
import { apiFetch } from './api';

const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
};

export const useUsersQuery = () => useQuery({ queryKey: userKeys.list(), queryFn: () => apiFetch<UserList>('/admin/users') });
