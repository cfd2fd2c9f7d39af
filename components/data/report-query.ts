import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { ReportPreview } from '../../shared/report/preview';
import type { SignBody, TransitionBody } from '../../shared/report/requests';
import type { ThresholdsChoice } from '../../shared/report/thresholds-basis';
import type { StudyAction } from '../../shared/study/state-machine';
import { apiFetch } from './api';

export const reportKeys = { preview: (studyId: string, thresholds: ThresholdsChoice = 'original') => ['studies', 'report', studyId, thresholds] as const };

/** The report as it would be signed now, what is missing, the versions signed so far, and what you may do. */
export function useReportPreview(studyId: string, thresholds: ThresholdsChoice = 'original') {
  return useQuery({
    queryKey: reportKeys.preview(studyId, thresholds),
    queryFn: () => apiFetch<ReportPreview>(`/studies/${studyId}/report${thresholds === 'current' ? '?thresholds=current' : ''}`),
    placeholderData: (previous) => previous,
  });
}

/** Moves the study along (ready for review, send back, addendum) or signs it; then everything about the study is read again. */
export function useReportAction(studyId: string) {
  const client = useQueryClient();
  return useMutation({
    mutationFn: ({ action, version, reason, thresholds }: { action: StudyAction } & SignBody) => {
      if (action === 'sign' || action === 'sign-addendum') {
        const body: SignBody = { version, ...(reason ? { reason } : {}), ...(thresholds ? { thresholds } : {}) };
        return apiFetch(`/studies/${studyId}/sign`, { method: 'POST', body: JSON.stringify(body) });
      }
      const body: TransitionBody = { action, version, ...(reason ? { reason } : {}) };
      return apiFetch(`/studies/${studyId}/transitions`, { method: 'POST', body: JSON.stringify(body) });
    },
    retry: false,
    onSettled: () => client.invalidateQueries({ queryKey: ['studies'] }),
  });
}
