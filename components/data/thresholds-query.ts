import { useQuery } from '@tanstack/react-query';
import { defaultThresholds, type Thresholds } from '../../shared/physiology';
import type { ThresholdsInForce } from '../../shared/settings/threshold-ranges';
import { apiFetch } from './api';

export const thresholdKeys = { inForce: ['settings', 'thresholds'] as const };

/**
 * The lab's thresholds in force, so the live form judges with the same values as the server.
 * Until they arrive (or offline with nothing cached) the published defaults stand in, and `loaded`
 * says so.
 */
export function useThresholds(): { overrides: Partial<Thresholds>; values: Thresholds; loaded: boolean } {
  const q = useQuery({
    queryKey: thresholdKeys.inForce,
    queryFn: () => apiFetch<ThresholdsInForce>('/settings/thresholds'),
    staleTime: 5 * 60_000,
  });
  return q.data ? { overrides: q.data.overrides, values: q.data.values, loaded: true } : { overrides: {}, values: { ...defaultThresholds }, loaded: false };
}
