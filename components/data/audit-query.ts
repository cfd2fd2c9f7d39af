import { useInfiniteQuery } from '@tanstack/react-query';
import type { AuditExportFormat, AuditFilters, AuditTrailPage } from '../../shared/audit/trail';
import { apiFetch } from './api';

const auditKeys = {
  all: ['audit-trail'] as const,
  list: (filters: AuditFilters) => [...auditKeys.all, filters] as const,
};

const paramsOf = (values: Record<string, string | undefined>) => new URLSearchParams(Object.entries(values).filter((e): e is [string, string] => !!e[1]));

/** The audit trail newest first, one keyset page at a time ("Load more" follows the server's cursor). */
export function useAuditTrail(filters: AuditFilters) {
  return useInfiniteQuery({
    queryKey: auditKeys.list(filters),
    queryFn: ({ pageParam }) => apiFetch<AuditTrailPage>(`/audit-trail?${paramsOf({ ...filters, cursor: pageParam, limit: '50' })}`),
    initialPageParam: undefined as string | undefined,
    getNextPageParam: (last) => last.nextCursor ?? undefined,
    retry: (count, error) => count < 2 && !('status' in error && (error as { status: number }).status < 500 && (error as { status: number }).status > 0),
  });
}

/** The address of an export of the filtered trail (a download: the browser saves it). */
export function auditExportUrl(filters: AuditFilters, format: AuditExportFormat): string {
  return `/api/audit-trail/export?${paramsOf({ ...filters, format })}`;
}
