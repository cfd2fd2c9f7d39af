import { DataSource, EntityManager } from 'typeorm';
import type { LabSettings, LabSettingsView } from '../../../shared/settings/lab-settings';
import type { AuditActor } from '../../audit/audit';
import { LabSettingsRecord } from '../../db/entities/lab-settings.entity';
import { REPORT_TEMPLATE_VERSION } from '../../report-document/template-version';
import { listTemplateVersions } from '../../report-document/template-versions';

export type { LabSettings } from '../../../shared/settings/lab-settings';

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

/** The stored settings with the name of who changed them last. */
export type Row = Pick<LabSettingsRecord, 'timeZone' | 'signatureTargetHours' | 'ehrBaseUrl' | 'mailFrom' | 'templateVersion' | 'version' | 'updatedAt'> & { updatedByName: string | null };

/** The one settings row (`lock`: locked until the caller's transaction ends). */
export async function loadSettingsRow(db: DataSource | EntityManager, lock = false): Promise<Row> {
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

/** What applies to reports while the settings row is missing (see `loadSettingsRow`). */
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
  return effectiveOf(await loadSettingsRow(db), defaults);
}

/** The stored values beside what applies, for the admin screen. */
export async function labSettingsView(db: DataSource | EntityManager, defaults: ConfiguredDefaults): Promise<LabSettingsView> {
  const row = await loadSettingsRow(db);
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

/** The shipped template versions and the one new signatures use. */
export async function templateChoice(dataSource: DataSource, defaults: ConfiguredDefaults) {
  return { active: (await labSettings(dataSource, defaults)).templateVersion, versions: listTemplateVersions() };
}

/**
 * Writes `values` into the settings row read (and locked) as `read`, one version later; a database
 * restored without the row gets it (its other settings the column defaults). One statement:
 * INSERT … ON CONFLICT (id) DO UPDATE of the columns given.
 */
export async function saveSettingsRow(manager: EntityManager, read: Row, values: Partial<Pick<LabSettingsRecord, 'timeZone' | 'signatureTargetHours' | 'ehrBaseUrl' | 'mailFrom' | 'templateVersion'>>, actor: AuditActor): Promise<void> {
  const record = { ...values, version: read.version + 1, updatedAt: () => 'now()', updatedBy: actor.actorUserId ?? null };
  const metadata = manager.getRepository(LabSettingsRecord).metadata;
  const columns = Object.keys(record).map((property) => metadata.findColumnWithPropertyName(property)!.databaseName);
  await manager.createQueryBuilder().insert().into(LabSettingsRecord).values({ id: 1, ...record }).orUpdate(columns, ['id']).updateEntity(false).execute();
}
