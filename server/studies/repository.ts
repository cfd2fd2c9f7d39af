import type { DataSource, EntityManager } from 'typeorm';
import type {
  AcetylcholineDose,
  AttachmentSummary,
  CreateStudy,
  PatchStudy,
  StudyRecord,
  StudySections,
  VesselAssessment,
} from '../../shared/study/schema';
import { emptyDetails, emptyFindings, emptySetup } from '../../shared/study/schema';
import type { StudyState } from '../../shared/study/vocabulary';
import { HttpError, NotFoundError } from '../http/problem';
import { assignments, detailsColumns, findingsColumns, readSection, selectList, setupColumns } from './columns';

/** A write based on an older version than the stored one. Carries the current record for a merge. */
export class StaleVersionError extends HttpError {
  constructor(public readonly current: StudyRecord) {
    super(409, 'stale-version', 'The study has changed since you opened it', `Someone saved version ${current.version} while you were editing. Reload it, or merge your changes into it.`);
  }
}

type Db = DataSource | EntityManager;

export async function loadStudy(db: Db, id: string): Promise<StudyRecord | null> {
  const [row] = await db.query(
    `SELECT s.id, s.accession, s.state, s.version, s.created_at, s.updated_at, s.nitrate_reversal,
            p.mrn, p.family_name, p.given_name, to_char(p.birth_date, 'YYYY-MM-DD') AS birth_date, p.sex,
            ${selectList(detailsColumns, 's', 'details')}, ${selectList(setupColumns, 's', 'setup')}, ${selectList(findingsColumns, 's', 'findings')}
     FROM study s JOIN patient p ON p.id = s.patient_id WHERE s.id = $1`,
    [id],
  );
  if (!row) return null;
  const vesselRows = await db.query(
    `SELECT v.id, v.vessel, v.segment, v.visual_stenosis_pct::float8, v.rest_pa::float8, v.rest_pd::float8,
            v.hyperemia_pa::float8, v.hyperemia_pd::float8, v.console_ffr::float8, v.nhpr_kind, v.nhpr_value::float8,
            v.wedge_pressure::float8, v.drift_pd_pa::float8, v.pullback_pattern, v.decision,
            COALESCE(array_agg(i.transit_s::float8 ORDER BY i.position) FILTER (WHERE i.phase = 'rest'), '{}') AS rest_transit,
            COALESCE(array_agg(i.transit_s::float8 ORDER BY i.position) FILTER (WHERE i.phase = 'hyperemia'), '{}') AS hyperemia_transit
     FROM vessel_assessment v LEFT JOIN thermodilution_injection i ON i.vessel_assessment_id = v.id
     WHERE v.study_id = $1 GROUP BY v.id ORDER BY v.position`,
    [id],
  );
  const doseRows = await db.query(
    `SELECT id, vessel, micrograms::float8, constriction_pct::float8, symptoms, ischemic_ecg
     FROM acetylcholine_dose WHERE study_id = $1 ORDER BY position`,
    [id],
  );
  const attachmentRows = await db.query(
    `SELECT a.id, a.file_name, a.media_type, a.size_bytes::float8 AS size_bytes, a.sha256, a.uploaded_at, u.display_name
     FROM attachment a LEFT JOIN app_user u ON u.id = a.uploaded_by WHERE a.study_id = $1 ORDER BY a.uploaded_at, a.id`,
    [id],
  );
  return {
    id: row.id,
    accession: row.accession,
    state: row.state as StudyState,
    version: row.version,
    createdAt: row.created_at.toISOString(),
    updatedAt: row.updated_at.toISOString(),
    patient: { mrn: row.mrn, familyName: row.family_name, givenName: row.given_name, birthDate: row.birth_date, sex: row.sex },
    details: readSection(detailsColumns, row, 'details'),
    setup: readSection(setupColumns, row, 'setup'),
    findings: readSection(findingsColumns, row, 'findings'),
    vessels: vesselRows.map(
      (v: Record<string, never>): VesselAssessment => ({
        id: v.id,
        vessel: v.vessel,
        segment: v.segment,
        visualStenosisPct: v.visual_stenosis_pct,
        restPa: v.rest_pa,
        restPd: v.rest_pd,
        hyperemiaPa: v.hyperemia_pa,
        hyperemiaPd: v.hyperemia_pd,
        consoleFfr: v.console_ffr,
        nhprKind: v.nhpr_kind,
        nhprValue: v.nhpr_value,
        wedgePressure: v.wedge_pressure,
        driftPdPa: v.drift_pd_pa,
        restTransit: v.rest_transit,
        hyperemiaTransit: v.hyperemia_transit,
        pullbackPattern: v.pullback_pattern,
        decision: v.decision,
      }),
    ),
    vasoreactivity: {
      nitrateReversal: row.nitrate_reversal,
      doses: doseRows.map(
        (d: Record<string, never>): AcetylcholineDose => ({
          id: d.id,
          vessel: d.vessel,
          micrograms: d.micrograms,
          constrictionPct: d.constriction_pct,
          symptoms: d.symptoms,
          ischemicEcg: d.ischemic_ecg,
        }),
      ),
    },
    attachments: attachmentRows.map(
      (a: Record<string, never>): AttachmentSummary => ({
        id: a.id,
        fileName: a.file_name,
        mediaType: a.media_type,
        sizeBytes: a.size_bytes,
        sha256: a.sha256,
        uploadedAt: (a.uploaded_at as Date).toISOString(),
        uploadedBy: a.display_name,
      }),
    ),
  };
}

async function upsertPatient(db: EntityManager, patient: StudySections['patient']): Promise<string> {
  const [row] = await db.query(
    `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex) VALUES ($1, $2, $3, $4, $5)
     ON CONFLICT (mrn) DO UPDATE SET family_name = EXCLUDED.family_name, given_name = EXCLUDED.given_name,
       birth_date = EXCLUDED.birth_date, sex = EXCLUDED.sex, updated_at = now()
     RETURNING id`,
    [patient.mrn, patient.familyName, patient.givenName, patient.birthDate, patient.sex],
  );
  return row.id;
}

/** A readable, unique accession when the hospital's system has not supplied one. */
async function nextAccession(db: EntityManager, at: Date): Promise<string> {
  const day = at.toISOString().slice(0, 10).replaceAll('-', '');
  const [{ n }] = await db.query(`SELECT count(*)::int + 1 AS n FROM study WHERE accession LIKE $1`, [`ISB-${day}-%`]);
  return `ISB-${day}-${String(n).padStart(4, '0')}-${Math.random().toString(36).slice(2, 6).toUpperCase()}`;
}

export async function createStudy(dataSource: DataSource, input: CreateStudy, createdBy: string | null): Promise<string> {
  return dataSource.transaction(async (db) => {
    const patientId = await upsertPatient(db, input.patient);
    const details = { ...emptyDetails(), ...input.details };
    const set = assignments(detailsColumns, details, 1);
    const accession = await nextAccession(db, new Date());
    const [row] = await db.query(
      `INSERT INTO study (accession, patient_id, created_by, ${detailsColumns.map((c) => c.column).join(', ')})
       VALUES ($${set.values.length + 1}, $${set.values.length + 2}, $${set.values.length + 3}, ${set.values.map((_, i) => `$${i + 1}`).join(', ')})
       RETURNING id`,
      [...set.values, accession, patientId, createdBy],
    );
    return row.id as string;
  });
}

/** Replaces the sections the patch carries, in one transaction, if the version still matches. */
export async function patchStudy(dataSource: DataSource, id: string, patch: PatchStudy): Promise<{ changed: string[] }> {
  return dataSource.transaction(async (db) => {
    const sets: string[] = [];
    const values: unknown[] = [];
    const add = (a: { sql: string; values: unknown[] }) => {
      if (!a.sql) return;
      sets.push(a.sql);
      values.push(...a.values);
    };
    if (patch.patient) {
      const patientId = await upsertPatient(db, patch.patient);
      add({ sql: `patient_id = $${values.length + 1}`, values: [patientId] });
    }
    if (patch.details) add(assignments(detailsColumns, patch.details, values.length + 1));
    if (patch.setup) add(assignments(setupColumns, patch.setup, values.length + 1));
    if (patch.findings) add(assignments(findingsColumns, patch.findings, values.length + 1));
    if (patch.vasoreactivity) add({ sql: `nitrate_reversal = $${values.length + 1}`, values: [patch.vasoreactivity.nitrateReversal] });
    const updated = await db.query(
      `UPDATE study SET ${[...sets, 'version = version + 1', 'updated_at = now()'].join(', ')}
       WHERE id = $${values.length + 1} AND version = $${values.length + 2} RETURNING version`,
      [...values, id, patch.version],
    );
    // TypeORM answers an UPDATE … RETURNING with [rows, count]; older drivers with the rows alone.
    const rows: unknown[] = Array.isArray(updated[0]) ? updated[0] : updated;
    if (rows.length === 0) {
      const current = await loadStudy(db, id);
      if (!current) throw new NotFoundError('No study has this id.');
      throw new StaleVersionError(current);
    }
    if (patch.vessels) await replaceVessels(db, id, patch.vessels);
    if (patch.vasoreactivity) await replaceDoses(db, id, patch.vasoreactivity.doses);
    return { changed: Object.keys(patch).filter((k) => k !== 'version') };
  });
}

async function replaceVessels(db: EntityManager, studyId: string, vessels: VesselAssessment[]): Promise<void> {
  await db.query(`DELETE FROM vessel_assessment WHERE study_id = $1`, [studyId]);
  for (const [position, v] of vessels.entries()) {
    await db.query(
      `INSERT INTO vessel_assessment (id, study_id, position, vessel, segment, visual_stenosis_pct, rest_pa, rest_pd,
         hyperemia_pa, hyperemia_pd, console_ffr, nhpr_kind, nhpr_value, wedge_pressure, drift_pd_pa, pullback_pattern, decision)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17)`,
      [v.id, studyId, position, v.vessel, v.segment, v.visualStenosisPct, v.restPa, v.restPd, v.hyperemiaPa, v.hyperemiaPd, v.consoleFfr, v.nhprKind, v.nhprValue, v.wedgePressure, v.driftPdPa, v.pullbackPattern, v.decision],
    );
    const injections = [
      ...v.restTransit.map((t, i) => ['rest', i, t] as const),
      ...v.hyperemiaTransit.map((t, i) => ['hyperemia', i, t] as const),
    ];
    if (injections.length) {
      await db.query(
        `INSERT INTO thermodilution_injection (vessel_assessment_id, phase, position, transit_s)
         SELECT $1, phase, position, transit FROM unnest($2::text[], $3::int[], $4::numeric[]) AS t(phase, position, transit)`,
        [v.id, injections.map((x) => x[0]), injections.map((x) => x[1]), injections.map((x) => x[2])],
      );
    }
  }
}

async function replaceDoses(db: EntityManager, studyId: string, doses: AcetylcholineDose[]): Promise<void> {
  await db.query(`DELETE FROM acetylcholine_dose WHERE study_id = $1`, [studyId]);
  for (const [position, d] of doses.entries()) {
    await db.query(
      `INSERT INTO acetylcholine_dose (id, study_id, position, vessel, micrograms, constriction_pct, symptoms, ischemic_ecg)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8)`,
      [d.id, studyId, position, d.vessel, d.micrograms, d.constrictionPct, d.symptoms, d.ischemicEcg],
    );
  }
}

export { emptyDetails, emptySetup, emptyFindings };
