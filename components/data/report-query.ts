import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { MissingItem } from '../../shared/report/completeness';
import type { ReportDocument } from '../../shared/report/document';
import type { StudyAction } from '../../shared/study/state-machine';
import { apiFetch } from './api';

export interface SignedVersion {
  id: string;
  versionNo: number;
  status: 'final' | 'amended';
  signedAt: string;
  signerName: string;
  contentSha256: string;
}

export interface ReportPreview {
  studyId: string;
  studyVersion: number;
  state: string;
  kind: string;
  html: string;
  text: string;
  /** The narrative as structured data: laid out as text, never as markup. */
  document: ReportDocument;
  completeness: { complete: boolean; missing: MissingItem[] };
  versions: SignedVersion[];
  actions: StudyAction[];
}

export const reportKeys = { preview: (studyId: string) => ['studies', 'report', studyId] as const };

/** The report as it would be signed now, what is missing, the versions signed so far, and what you may do. */
export function useReportPreview(studyId: string) {
  return useQuery({ queryKey: reportKeys.preview(studyId), queryFn: () => apiFetch<ReportPreview>(`/studies/${studyId}/report`) });
}

/** Moves the study along (ready for review, send back, addendum) or signs it; then everything about the study is read again. */
export function useReportAction(studyId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ action, version, reason }: { action: StudyAction; version: number; reason?: string }) =>
      action === 'sign' || action === 'sign-addendum'
        ? apiFetch(`/studies/${studyId}/sign`, { method: 'POST', body: JSON.stringify({ version, ...(reason ? { reason } : {}) }) })
        : apiFetch(`/studies/${studyId}/transitions`, { method: 'POST', body: JSON.stringify({ action, version, ...(reason ? { reason } : {}) }) }),
    retry: false,
    onSettled: () => client.invalidateQueries({ queryKey: ['studies'] }),
  });
}
