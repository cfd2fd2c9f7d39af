import { infiniteQueryOptions, useInfiniteQuery, useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { AttachmentSummary, CreateStudy, StudyRecord } from '../../shared/study/schema';
import type { WorklistItem, WorklistPage } from '../../shared/study/worklist';
import type { OperatorList } from '../../shared/study/operators';
import type { StudyState } from '../../shared/study/vocabulary';
import { apiFetch, ApiError } from './api';

/** A study as lists show it: the same shape for the worklist, the coding queue and turnaround. */
export type StudySummary = WorklistItem;

export interface WorklistFilters {
  state?: StudyState;
  q?: string;
  operatorId?: string;
  from?: string;
  to?: string;
}

export const studyKeys = {
  all: ['studies'] as const,
  lists: () => [...studyKeys.all, 'list'] as const,
  list: (filters: WorklistFilters) => [...studyKeys.lists(), filters] as const,
  detail: (id: string) => [...studyKeys.all, 'detail', id] as const,
  operators: ['operators'] as const,
};

const queryString = (params: Record<string, string | number | undefined>) => {
  const entries = Object.entries(params).filter(([, v]) => v !== undefined && v !== '') as [string, string][];
  return entries.length ? `?${new URLSearchParams(entries.map(([k, v]) => [k, String(v)])).toString()}` : '';
};

/** The worklist, one keyset page at a time. */
export const worklistQueryOptions = (filters: WorklistFilters) =>
  infiniteQueryOptions({
    queryKey: studyKeys.list(filters),
    queryFn: ({ pageParam }) => apiFetch<WorklistPage>(`/studies${queryString({ ...filters, limit: 25, cursor: pageParam })}`),
    initialPageParam: undefined as string | undefined,
    getNextPageParam: (last) => last.nextCursor ?? undefined,
  });

export function useWorklist(filters: WorklistFilters) {
  return useInfiniteQuery(worklistQueryOptions(filters));
}

export function useStudy(id: string) {
  return useQuery({
    queryKey: studyKeys.detail(id),
    queryFn: () => apiFetch<StudyRecord>(`/studies/${id}`),
    // The form owns the record once loaded; refetching under it would fight the user's typing.
    staleTime: Infinity,
    refetchOnWindowFocus: false,
  });
}

export function useOperators() {
  return useQuery({
    queryKey: studyKeys.operators,
    queryFn: () => apiFetch<OperatorList>('/operators'),
    staleTime: 5 * 60_000,
  });
}

export function useCreateStudy() {
  const queryClient = useQueryClient();
  return useMutation({
    mutationFn: (input: CreateStudy) => apiFetch<StudyRecord>('/studies', { method: 'POST', body: JSON.stringify(input) }),
    onSuccess: (study) => {
      queryClient.setQueryData(studyKeys.detail(study.id), study);
      void queryClient.invalidateQueries({ queryKey: studyKeys.lists() });
    },
  });
}

/** PATCH whole sections at a version; the caller handles 409 (stale) and offline. */
export function patchStudyRequest(id: string, body: Record<string, unknown>, { keepalive = false } = {}) {
  return apiFetch<StudyRecord>(`/studies/${id}`, { method: 'PATCH', body: JSON.stringify(body), keepalive });
}

/** Upload with progress (fetch has no upload progress on the web, XMLHttpRequest does). */
export function uploadAttachment(studyId: string, file: Blob, fileName: string, onProgress: (fraction: number) => void): Promise<AttachmentSummary> {
  return new Promise((resolve, reject) => {
    const xhr = new XMLHttpRequest();
    xhr.open('POST', `/api/studies/${studyId}/attachments`);
    xhr.withCredentials = true;
    xhr.setRequestHeader('Accept', 'application/json');
    xhr.upload.onprogress = (e) => e.lengthComputable && onProgress(e.loaded / e.total);
    xhr.onerror = () => reject(new ApiError({ type: 'about:blank', title: 'Network unavailable', status: 0, detail: 'The upload could not reach the server.' }));
    xhr.onload = () => {
      let body: unknown;
      try {
        body = JSON.parse(xhr.responseText);
      } catch {
        body = undefined;
      }
      if (xhr.status >= 200 && xhr.status < 300) resolve(body as AttachmentSummary);
      else reject(new ApiError((body as ApiError['problem']) ?? { type: 'about:blank', title: 'Upload failed', status: xhr.status }));
    };
    const form = new FormData();
    form.append('file', file, fileName);
    xhr.send(form);
  });
}

export const deleteAttachmentRequest = (id: string) => apiFetch<void>(`/attachments/${id}`, { method: 'DELETE' });
