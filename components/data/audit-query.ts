import { useInfiniteQuery } from '@tanstack/react-query';
import type { AuditActionCode, AuditTrailPage } from '../../shared/audit/trail';
import { apiFetch } from './api';

export interface AuditFilters {
  user?: string;
  patient?: string;
  action?: AuditActionCode;
  from?: string;
  to?: string;
}

export const auditKeys = {
  all: ['audit-trail'] as const,
  list: (filters: AuditFilters) => [...auditKeys.all, filters] as const,
};

/** The audit trail newest first, one keyset page at a time. */
export function useAuditTrail(filters: AuditFilters) {
  return useInfiniteQuery({
    queryKey: auditKeys.list(filters),
    queryFn: ({ pageParam }) => {
      const params = new URLSearchParams(Object.entries({ ...filters, before: pageParam, limit: '50' }).filter((e): e is [string, string] => !!e[1]));
      return apiFetch<AuditTrailPage>(`/audit-trail?${params.toString()}`);
    },
    initialPageParam: undefined as string | undefined,
    getNextPageParam: (last) => last.nextCursor ?? undefined,
  });
}
