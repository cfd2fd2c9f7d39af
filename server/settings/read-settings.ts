import type { DataSource } from 'typeorm';
import { roleLabel, type Role } from '../../shared/auth/permissions';
import type { RoleMapping } from '../../shared/settings/admin';
import { recordAudit, type AuditActor } from '../audit/audit';
import { RecordNotFoundError } from '../errors';
import { readTemplateVersion } from '../report-document/template-versions';
import { labSettingsView, templateChoice, type ConfiguredDefaults } from './queries/lab-settings';
import { thresholdOverview } from './queries/thresholds';

// Reading the lab's settings is audited too: the trail answers who looked at what, not only who changed it.
const auditRead = (dataSource: DataSource, actor: AuditActor, entityId: string, detail?: Record<string, unknown>) =>
  recordAudit(dataSource, { ...actor, action: 'read', entityType: 'settings', entityId, outcome: 'success', ...(detail ? { detail } : {}) });

/** The identity provider claim and the group → role table in force (set by configuration). */
export async function readRoleMapping(
  dataSource: DataSource,
  oidc: { roleClaim: string; roleMap: Record<string, Role> },
  defaultRoleMap: Record<string, Role>,
  actor: AuditActor,
): Promise<RoleMapping> {
  await auditRead(dataSource, actor, 'role-mapping');
  return {
    claim: oidc.roleClaim,
    rules: Object.entries(oidc.roleMap).map(([group, role]) => ({ group, role, roleLabel: roleLabel[role] })),
    isDefault: JSON.stringify(oidc.roleMap) === JSON.stringify(defaultRoleMap),
  };
}

export async function readThresholds(dataSource: DataSource, actor: AuditActor) {
  const overview = await thresholdOverview(dataSource);
  await auditRead(dataSource, actor, 'thresholds');
  return overview;
}

export async function readLabSettings(dataSource: DataSource, defaults: ConfiguredDefaults, actor: AuditActor) {
  const view = await labSettingsView(dataSource, defaults);
  await auditRead(dataSource, actor, 'lab-settings');
  return view;
}

export async function readTemplateChoice(dataSource: DataSource, defaults: ConfiguredDefaults, actor: AuditActor) {
  const choice = await templateChoice(dataSource, defaults);
  await auditRead(dataSource, actor, 'report-templates');
  return choice;
}

export async function readTemplate(dataSource: DataSource, version: string, actor: AuditActor) {
  const detail = readTemplateVersion(version);
  if (!detail) throw new RecordNotFoundError(`No report template version "${version.slice(0, 20)}" is shipped.`);
  await auditRead(dataSource, actor, 'report-template', { version: detail.version });
  return detail;
}
