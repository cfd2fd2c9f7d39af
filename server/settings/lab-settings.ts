import { DataSource, EntityManager } from 'typeorm';
import type { LabSettings, LabSettingsForm, LabSettingsView } from '../../shared/settings/lab-settings';
import { recordAudit, type AuditActor } from '../audit/audit';
import { LabSettingsRecord } from '../db/entities/lab-settings.entity';
import { InvalidRequestError, RecordNotFoundError } from '../errors';
import { REPORT_TEMPLATE_VERSION } from '../report-document/template-version';
import { isShippedTemplateVersion } from '../report-document/template-versions';

export type { LabSettings } from '../../shared/settings/lab-settings';

/** What applies where the lab has stored nothing: the server's configuration. */
export interface ConfiguredDefaults {
  ehrBaseUrl: string;
  mailFrom: string;
  /** Hosts (host[:port]) an EHR endpoint setting may name. */
  allowedEhrHosts?: string[];
}

/** The configuration's values, for `labSettings(db, defaultsFrom(config))`. */
export const defaultsFrom = (config: { ehr: { fhirBaseUrl: string; allowedHosts?: string[] }; mail: { from: string } }): ConfiguredDefaults => ({
  ehrBaseUrl: config.ehr.fhirBaseUrl,
  mailFrom: config.mail.from,
  allowedEhrHosts: config.ehr.allowedHosts ?? [new URL(config.ehr.fhirBaseUrl).host],
});

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

/** The stored settings with the name of who changed them last. */
type Row = Pick<LabSettingsRecord, 'timeZone' | 'signatureTargetHours' | 'ehrBaseUrl' | 'mailFrom' | 'templateVersion' | 'version' | 'updatedAt'> & { updatedByName: string | null };

/** The one settings row (`lock`: locked until the caller's transaction ends). */
async function readRow(db: DataSource | EntityManager, lock = false): Promise<Row> {
  const manager = db instanceof DataSource ? db.manager : db;
  const q = manager.createQueryBuilder(LabSettingsRecord, 'l').leftJoin('l.updater', 'u').addSelect(['u.id', 'u.displayName']).where('l.id = 1');
  if (lock) q.setLock('pessimistic_write', undefined, ['l']);
  const stored = await q.getOne();
  const row: Row | undefined = stored ? { ...stored, updatedByName: stored.updater?.displayName ?? null } : undefined;
  // The migration writes the row; a database restored without it still works on the defaults.
  return (
    row ?? {
      timeZone: unstoredSettings.time_zone,
      templateVersion: unstoredSettings.template_version,
      signatureTargetHours: 24,
      ehrBaseUrl: null,
      mailFrom: null,
      version: 1,
      updatedAt: null,
      updatedByName: null,
    }
  );
}

/** What applies to reports while the settings row is missing (see `readRow`). */
export const unstoredSettings = { time_zone: 'UTC', template_version: REPORT_TEMPLATE_VERSION } as const;

/** The settings the server's configuration stands in for where the lab has stored none. */
type Configurable = 'ehrBaseUrl' | 'mailFrom';

/** What applies of the settings `K` names defaults for, besides those that are always stored. */
export type AppliedLabSettings<K extends keyof ConfiguredDefaults = never> = Omit<LabSettings, Configurable> & Pick<LabSettings, K & Configurable>;

/** What applies: the stored value, else the configured one given in `defaults`; a configurable setting whose default is not given is left out. */
function effectiveOf<K extends keyof ConfiguredDefaults>(row: Row, defaults: Pick<ConfiguredDefaults, K>): AppliedLabSettings<K> {
  const given: Partial<ConfiguredDefaults> = defaults;
  return {
    timeZone: row.timeZone,
    signatureTargetHours: row.signatureTargetHours,
    templateVersion: row.templateVersion,
    ...(given.ehrBaseUrl !== undefined ? { ehrBaseUrl: row.ehrBaseUrl ?? given.ehrBaseUrl } : {}),
    ...(given.mailFrom !== undefined ? { mailFrom: row.mailFrom ?? given.mailFrom } : {}),
  } as AppliedLabSettings<K>;
}

/**
 * The lab's settings as they apply now: the time zone, the signature target and the report template
 * version new signatures use; and the EHR endpoint and the mail sender (the stored ones, else the
 * configured ones) for a caller that gives the server's configured values (`defaultsFrom(config)`, or
 * the one it needs). This module never reads the configuration itself.
 */
export async function labSettings<K extends keyof ConfiguredDefaults = never>(
  db: DataSource | EntityManager,
  defaults: Pick<ConfiguredDefaults, K> = {} as Pick<ConfiguredDefaults, K>,
): Promise<AppliedLabSettings<K>> {
  return effectiveOf(await readRow(db), defaults);
}

/** The stored values beside what applies, for the admin screen. */
export async function labSettingsView(db: DataSource | EntityManager, defaults: ConfiguredDefaults): Promise<LabSettingsView> {
  const row = await readRow(db);
  return {
    stored: {
      timeZone: row.timeZone,
      signatureTargetHours: row.signatureTargetHours,
      ehrBaseUrl: row.ehrBaseUrl,
      mailFrom: row.mailFrom,
      templateVersion: row.templateVersion,
    },
    effective: effectiveOf(row, defaults),
    configured: { ehrBaseUrl: defaults.ehrBaseUrl, mailFrom: defaults.mailFrom },
    updatedAt: row.updatedAt?.toISOString() ?? null,
    updatedBy: row.updatedByName,
    version: row.version,
  };
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

/**
 * Writes `values` into the settings row read (and locked) as `read`, one version later; a database
 * restored without the row gets it (its other settings the column defaults). One statement:
 * INSERT … ON CONFLICT (id) DO UPDATE of the columns given.
 */
async function saveRow(manager: EntityManager, read: Row, values: Partial<Pick<LabSettingsRecord, 'timeZone' | 'signatureTargetHours' | 'ehrBaseUrl' | 'mailFrom' | 'templateVersion'>>, actor: AuditActor): Promise<void> {
  const record = { ...values, version: read.version + 1, updatedAt: () => 'now()', updatedBy: actor.actorUserId ?? null };
  const metadata = manager.getRepository(LabSettingsRecord).metadata;
  const columns = Object.keys(record).map((property) => metadata.findColumnWithPropertyName(property)!.databaseName);
  await manager.createQueryBuilder().insert().into(LabSettingsRecord).values({ id: 1, ...record }).orUpdate(columns, ['id']).updateEntity(false).execute();
}

/** Saves the lab's settings (not the template version, which is activated on its own) with one audit row: before and after. */
export async function updateLabSettings(dataSource: DataSource, input: { settings: LabSettingsForm; version: number }, actor: AuditActor, defaults: ConfiguredDefaults): Promise<LabSettingsView> {
  return dataSource.transaction(async (manager) => {
    const row = await readRow(manager, true);
    if (row.version !== input.version) throw new StaleSettingsError(await labSettingsView(manager, defaults));
    const before: LabSettingsForm = { timeZone: row.timeZone, signatureTargetHours: row.signatureTargetHours, ehrBaseUrl: row.ehrBaseUrl, mailFrom: row.mailFrom };
    const after: LabSettingsForm = { ...input.settings, ehrBaseUrl: input.settings.ehrBaseUrl || null, mailFrom: input.settings.mailFrom || null };
    const allowed = defaults.allowedEhrHosts;
    if (after.ehrBaseUrl && allowed && !allowed.includes(new URL(after.ehrBaseUrl).host.toLowerCase())) throw new EhrHostNotAllowedError(new URL(after.ehrBaseUrl).host, allowed);
    const changed = changes(before, after);
    if (Object.keys(changed).length === 0) return labSettingsView(manager, defaults);
    await saveRow(manager, row, { timeZone: after.timeZone, signatureTargetHours: after.signatureTargetHours, ehrBaseUrl: after.ehrBaseUrl, mailFrom: after.mailFrom }, actor);
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
    const row = await readRow(manager, true);
    if (row.templateVersion !== version) {
      await saveRow(manager, row, { templateVersion: version }, actor);
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
