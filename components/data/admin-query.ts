import { useMutation, useQuery, useQueryClient } from '@tanstack/react-query';
import type { RoleMapping, TemplateVersionDetail, TemplateVersionList } from '../../shared/settings/admin';
import type { LabSettingsForm, LabSettingsView } from '../../shared/settings/lab-settings';
import type { ThresholdOverview, ThresholdSetRequest, ThresholdSetSummary } from '../../shared/settings/threshold-ranges';
import { apiFetch } from './api';
import { thresholdKeys } from './thresholds-query';

const adminKeys = {
  all: ['admin'] as const,
  roleMapping: () => [...adminKeys.all, 'role-mapping'] as const,
  thresholds: () => [...adminKeys.all, 'thresholds'] as const,
  labSettings: () => [...adminKeys.all, 'lab-settings'] as const,
  templates: () => [...adminKeys.all, 'templates'] as const,
  template: (version: string) => [...adminKeys.all, 'templates', version] as const,
};

export const useRoleMappingQuery = () => useQuery({ queryKey: adminKeys.roleMapping(), queryFn: () => apiFetch<RoleMapping>('/admin/role-mapping') });
export const useThresholdOverviewQuery = () => useQuery({ queryKey: adminKeys.thresholds(), queryFn: () => apiFetch<ThresholdOverview>('/admin/thresholds') });
export const useLabSettingsQuery = () => useQuery({ queryKey: adminKeys.labSettings(), queryFn: () => apiFetch<LabSettingsView>('/admin/lab-settings') });
export const useTemplateVersionsQuery = () => useQuery({ queryKey: adminKeys.templates(), queryFn: () => apiFetch<TemplateVersionList>('/admin/report-templates') });
export const useTemplateVersionQuery = (version: string | null) =>
  useQuery({ queryKey: adminKeys.template(version ?? ''), queryFn: () => apiFetch<TemplateVersionDetail>(`/admin/report-templates/${version}`), enabled: !!version });

/** A new threshold set; the overview and the live form's thresholds are read again. */
export function useCreateThresholdSet() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: ThresholdSetRequest) => apiFetch<{ set: ThresholdSetSummary; overview: ThresholdOverview }>('/admin/thresholds', { method: 'POST', body: JSON.stringify(body) }),
    retry: false,
    onSuccess: (data) => client.setQueryData(adminKeys.thresholds(), data.overview),
    onSettled: () => {
      void client.invalidateQueries({ queryKey: adminKeys.thresholds() });
      void client.invalidateQueries({ queryKey: thresholdKeys.inForce });
    },
  });
}

export function useSaveLabSettings() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (body: { settings: LabSettingsForm; version: number }) => apiFetch<LabSettingsView>('/admin/lab-settings', { method: 'PUT', body: JSON.stringify(body) }),
    retry: false,
    onSuccess: (data) => client.setQueryData(adminKeys.labSettings(), data),
    onSettled: () => client.invalidateQueries({ queryKey: adminKeys.labSettings() }),
  });
}

export function useActivateTemplate() {
  const client = useQueryClient();
  return useMutation({
    mutationFn: (version: string) => apiFetch<TemplateVersionList>('/admin/report-templates/active', { method: 'POST', body: JSON.stringify({ version }) }),
    retry: false,
    onSuccess: (data) => client.setQueryData(adminKeys.templates(), data),
    onSettled: () => {
      void client.invalidateQueries({ queryKey: adminKeys.templates() });
      void client.invalidateQueries({ queryKey: adminKeys.labSettings() });
    },
  });
}
