import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { DeliveryListItem, DeliveryStatus, StudyDelivery } from '../../shared/delivery/status';
import { apiFetch } from './api';

const deliveryKeys = {
  all: ['deliveries'] as const,
  study: (studyId: string) => ['deliveries', 'study', studyId] as const,
  attention: (status?: DeliveryStatus) => ['deliveries', 'attention', status ?? 'all'] as const,
};

/** The EHR delivery of each signed version of a study; refreshed while a delivery is still moving. */
export function useStudyDeliveriesQuery(studyId: string) {
  return useQuery({
    queryKey: deliveryKeys.study(studyId),
    queryFn: () => apiFetch<{ items: StudyDelivery[] }>(`/studies/${encodeURIComponent(studyId)}/deliveries`),
    refetchInterval: (query) => (query.state.data?.items.some((d) => d.status === 'queued' || d.status === 'sending' || d.status === 'failed-retrying') ? 10_000 : false),
  });
}

/** Deliveries retrying, rejected or given up (accession, status and issues only). */
export function useDeliveriesNeedingAttentionQuery(status?: DeliveryStatus, enabled = true) {
  return useQuery({
    enabled,
    queryKey: deliveryKeys.attention(status),
    queryFn: () => apiFetch<{ items: DeliveryListItem[] }>(`/deliveries${status ? `?status=${status}` : ''}`),
    refetchInterval: 30_000,
  });
}

/** Send a signed report version to the EHR again. */
export function useResendDelivery() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (reportVersionId: string) => apiFetch<{ status: 'queued' }>(`/report-versions/${encodeURIComponent(reportVersionId)}/resend`, { method: 'POST', body: '{}' }),
    onSettled: () => client.invalidateQueries({ queryKey: deliveryKeys.all }),
  });
}
