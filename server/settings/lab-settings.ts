import type { DataSource } from 'typeorm';
import type { LabSettingsForm, LabSettingsView } from '../../shared/settings/lab-settings';
import { recordAudit, type AuditActor } from '../audit/audit';
import { InvalidRequestError, RecordNotFoundError } from '../errors';
import { isShippedTemplateVersion } from '../report-document/template-versions';
import { labSettingsView, loadSettingsRow, saveSettingsRow, type ConfiguredDefaults } from './queries/lab-settings';

/** What applies to reports while the settings row is missing (signing stores it with a signature). */
export { unstoredSettings } from './queries/lab-settings';

/**
 * Signed reports go wherever this endpoint says, with patient identity: an admin may choose only among
 * hosts the server's configuration names, so a changed setting cannot send them to another server or
 * probe the hospital's internal network.
 */
class EhrHostNotAllowedError extends InvalidRequestError {
  constructor(host: string, allowed: string[]) {
    super(`EHR endpoint: ${host} is not one of the hosts this server may deliver to (${allowed.join(', ')}). The server's configuration (EHR_ALLOWED_HOSTS) lists them.`, [
      { pointer: '/settings/ehrBaseUrl', detail: `EHR endpoint must be on one of: ${allowed.join(', ')}.` },
    ]);
  }
}

export class StaleSettingsError extends Error {
  constructor(public readonly current: LabSettingsView) {
    super(`Someone saved version ${current.version} of the settings meanwhile. Review them and save again.`);
    this.name = 'StaleSettingsError';
  }
}


/** What changed, as `{ field: { before, after } }`; unchanged fields are left out. */
function changes<T extends Record<string, unknown>>(before: T, after: T): Record<string, { before: unknown; after: unknown }> {
  const out: Record<string, { before: unknown; after: unknown }> = {};
  for (const k of Object.keys(after)) if (before[k] !== after[k]) out[k] = { before: before[k], after: after[k] };
  return out;
}

/** Saves the lab's settings (not the template version, which is activated on its own) with one audit row: before and after. */
export async function updateLabSettings(dataSource: DataSource, input: { settings: LabSettingsForm; version: number }, actor: AuditActor, defaults: ConfiguredDefaults): Promise<LabSettingsView> {
  return dataSource.transaction(async (manager) => {
    const row = await loadSettingsRow(manager, true);
    if (row.version !== input.version) throw new StaleSettingsError(await labSettingsView(manager, defaults));
    const before: LabSettingsForm = { timeZone: row.timeZone, signatureTargetHours: row.signatureTargetHours, ehrBaseUrl: row.ehrBaseUrl, mailFrom: row.mailFrom };
    const after: LabSettingsForm = { ...input.settings, ehrBaseUrl: input.settings.ehrBaseUrl || null, mailFrom: input.settings.mailFrom || null };
    const allowed = defaults.allowedEhrHosts;
    if (after.ehrBaseUrl && allowed && !allowed.includes(new URL(after.ehrBaseUrl).host.toLowerCase())) throw new EhrHostNotAllowedError(new URL(after.ehrBaseUrl).host, allowed);
    const changed = changes(before, after);
    if (Object.keys(changed).length === 0) return labSettingsView(manager, defaults);
    await saveSettingsRow(manager, row, { timeZone: after.timeZone, signatureTargetHours: after.signatureTargetHours, ehrBaseUrl: after.ehrBaseUrl, mailFrom: after.mailFrom }, actor);
    await recordAudit(manager, {
      ...actor,
      action: 'update',
      entityType: 'settings',
      entityId: 'lab-settings',
      outcome: 'success',
      detail: { setting: 'lab-settings', before, after, changed },
    });
    return labSettingsView(manager, defaults);
  });
}

/** Makes a shipped template version the one new signatures (and previews) use; signed versions keep theirs. */
export async function activateTemplateVersion(dataSource: DataSource, version: string, actor: AuditActor, defaults: ConfiguredDefaults): Promise<LabSettingsView> {
  if (!isShippedTemplateVersion(version)) throw new RecordNotFoundError(`No report template version "${version}" is shipped.`);
  return dataSource.transaction(async (manager) => {
    const row = await loadSettingsRow(manager, true);
    if (row.templateVersion !== version) {
      await saveSettingsRow(manager, row, { templateVersion: version }, actor);
      await recordAudit(manager, {
        ...actor,
        action: 'update',
        entityType: 'settings',
        entityId: 'report-template',
        outcome: 'success',
        detail: { setting: 'report-template', before: { templateVersion: row.templateVersion }, after: { templateVersion: version } },
      });
    }
    return labSettingsView(manager, defaults);
  });
}
