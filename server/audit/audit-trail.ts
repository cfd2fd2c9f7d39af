import type { DataSource } from 'typeorm';
import { auditActionLabel, type AuditActionCode, type AuditTrailPage, type AuditTrailQuery } from '../../shared/audit/trail';

/**
 * The audit trail, newest first, one keyset page at a time over the numeric id (the primary key
 * index answers `id < $before ORDER BY id DESC LIMIT n` without sorting). Targets are joined to
 * the patient, study or user they name, so the trail reads "Aster, Ada · MRN … · ACC-…".
 */
export async function readAuditTrail(db: DataSource, q: AuditTrailQuery): Promise<AuditTrailPage> {
  const where: string[] = [];
  const params: unknown[] = [];
  const add = (sql: (p: string) => string, value: unknown) => {
    params.push(value);
    where.push(sql(`$${params.length}`));
  };
  if (q.before) add((p) => `a.id < ${p}::bigint`, q.before);
  if (q.action) add((p) => `a.action = ${p}`, q.action);
  if (q.user) add((p) => `a.actor_name ILIKE '%' || ${p} || '%'`, q.user.replace(/[%_\\]/g, '\\$&'));
  if (q.from) add((p) => `a.recorded_at >= ${p}::date`, q.from);
  if (q.to) add((p) => `a.recorded_at < (${p}::date + 1)`, q.to);
  if (q.patient) {
    // The patient by MRN (exact, any case) or family name (prefix): then the events on them or their studies.
    add(
      (p) => `(
        (a.entity_type = 'patient' AND a.entity_id IN (SELECT id::text FROM patient WHERE upper(mrn) = upper(${p}) OR lower(family_name) LIKE lower(${p}) || '%'))
        OR (a.entity_type = 'study' AND a.entity_id IN (SELECT s.id::text FROM study s JOIN patient pt ON pt.id = s.patient_id WHERE upper(pt.mrn) = upper(${p}) OR lower(pt.family_name) LIKE lower(${p}) || '%'))
      )`,
      q.patient,
    );
  }
  params.push(q.limit + 1);
  const rows: {
    id: string;
    recorded_at: Date;
    actor_name: string | null;
    actor_role: string | null;
    action: AuditActionCode;
    outcome: 'success' | 'failure' | 'denied';
    entity_type: string | null;
    entity_id: string | null;
    client_address: string | null;
    study_id: string | null;
    family_name: string | null;
    given_name: string | null;
    mrn: string | null;
    accession: string | null;
    user_name: string | null;
  }[] = await db.query(
    `SELECT a.id::text AS id, a.recorded_at, a.actor_name, a.actor_role, a.action, a.outcome, a.entity_type, a.entity_id, a.client_address,
            s.id::text AS study_id, coalesce(sp.family_name, pp.family_name) AS family_name, coalesce(sp.given_name, pp.given_name) AS given_name,
            coalesce(sp.mrn, pp.mrn) AS mrn, s.accession, u.display_name AS user_name
     FROM audit_event a
     LEFT JOIN study s ON a.entity_type = 'study' AND s.id::text = a.entity_id
     LEFT JOIN patient sp ON sp.id = s.patient_id
     LEFT JOIN patient pp ON a.entity_type = 'patient' AND pp.id::text = a.entity_id
     LEFT JOIN app_user u ON a.entity_type = 'user' AND u.id::text = a.entity_id
     ${where.length ? `WHERE ${where.join(' AND ')}` : ''}
     ORDER BY a.id DESC
     LIMIT $${params.length}`,
    params,
  );
  const page = rows.slice(0, q.limit);
  return {
    items: page.map((r) => ({
      id: r.id,
      recordedAt: r.recorded_at.toISOString(),
      actor: r.actor_name,
      actorRole: r.actor_role,
      action: r.action,
      actionLabel: auditActionLabel[r.action] ?? r.action,
      outcome: r.outcome,
      target: targetOf(r),
      studyId: r.study_id,
      clientAddress: r.client_address,
    })),
    nextCursor: rows.length > q.limit ? page[page.length - 1].id : null,
  };
}

const entityWords: Record<string, [one: string, list: string]> = {
  study: ['Study', 'Study list'],
  patient: ['Patient', 'Patient list'],
  user: ['User', 'User list'],
  attachment: ['Attachment', 'Attachments'],
  'audit-event': ['Audit event', 'Audit trail'],
};

function targetOf(r: { entity_type: string | null; entity_id: string | null; family_name: string | null; given_name: string | null; mrn: string | null; accession: string | null; user_name: string | null }): string | null {
  if (r.family_name) return [`${r.family_name}, ${r.given_name ?? ''}`.trim(), r.mrn ? `MRN ${r.mrn}` : null, r.accession].filter(Boolean).join(' · ');
  if (r.user_name) return r.user_name;
  if (!r.entity_type) return null;
  const [one, list] = entityWords[r.entity_type] ?? [r.entity_type, r.entity_type];
  return r.entity_id ? one : list;
}
