import type { DataSource, EntityManager } from 'typeorm';
import type { Details } from '../../shared/study/schema';
import { detailsColumns, findingsColumns, setupColumns } from '../studies/columns';
import { demoOperatorSubject, demoPatients, demoRecorderSubject, demoStudies, demoUsers, type DemoStudy } from './scenario';

/** Section columns and their values, in the same order. */
function columnValues<T>(columns: { field: keyof T; column: string }[], section: T): { names: string[]; values: unknown[] } {
  return { names: columns.map((c) => c.column), values: columns.map((c) => section[c.field] ?? null) };
}

/** The measurements of a study just created: vessels with their injections, acetylcholine doses. */
async function addMeasurements(db: EntityManager, studyId: string, s: DemoStudy): Promise<void> {
  for (const [position, v] of s.vessels.entries()) {
    const id = crypto.randomUUID();
    await db.query(
      `INSERT INTO vessel_assessment (id, study_id, position, vessel, segment, visual_stenosis_pct, rest_pa, rest_pd,
         hyperemia_pa, hyperemia_pd, console_ffr, nhpr_kind, nhpr_value, wedge_pressure, drift_pd_pa, pullback_pattern, decision)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8, $9, $10, $11, $12, $13, $14, $15, $16, $17)`,
      [id, studyId, position, v.vessel, v.segment, v.visualStenosisPct, v.restPa, v.restPd, v.hyperemiaPa, v.hyperemiaPd, v.consoleFfr, v.nhprKind, v.nhprValue, v.wedgePressure, v.driftPdPa, v.pullbackPattern, v.decision],
    );
    const injections = [...v.restTransit.map((t, i) => ['rest', i, t] as const), ...v.hyperemiaTransit.map((t, i) => ['hyperemia', i, t] as const)];
    if (injections.length) {
      await db.query(
        `INSERT INTO thermodilution_injection (vessel_assessment_id, phase, position, transit_s)
         SELECT $1, phase, position, transit FROM unnest($2::text[], $3::int[], $4::numeric[]) AS t(phase, position, transit)`,
        [id, injections.map((x) => x[0]), injections.map((x) => x[1]), injections.map((x) => x[2])],
      );
    }
  }
  for (const [position, d] of s.vasoreactivity.doses.entries()) {
    await db.query(
      `INSERT INTO acetylcholine_dose (id, study_id, position, vessel, micrograms, constriction_pct, symptoms, ischemic_ecg)
       VALUES ($1, $2, $3, $4, $5, $6, $7, $8)`,
      [crypto.randomUUID(), studyId, position, d.vessel, d.micrograms, d.constrictionPct, d.symptoms, d.ischemicEcg],
    );
  }
}

/**
 * Loads the demo scenario. Idempotent: rows are keyed by their natural keys (issuer + subject,
 * MRN, accession) and left alone when they already exist, so edits made in the demo survive.
 * A study gets its measurements only in the run that creates it, in the same transaction.
 */
export async function seedDemo(dataSource: DataSource, issuer: string, now = new Date()): Promise<void> {
  await dataSource.transaction(async (db) => {
    for (const u of demoUsers) {
      await db.query(
        `INSERT INTO app_user (issuer, subject, email, display_name, role) VALUES ($1, $2, $3, $4, $5)
         ON CONFLICT (issuer, subject) DO NOTHING`,
        [issuer, u.subject, u.email, u.displayName, u.role],
      );
    }
    for (const p of demoPatients) {
      await db.query(
        `INSERT INTO patient (mrn, family_name, given_name, birth_date, sex) VALUES ($1, $2, $3, $4, $5)
         ON CONFLICT (mrn) DO NOTHING`,
        [p.mrn, p.familyName, p.givenName, p.birthDate, p.sex],
      );
    }
    const userId = async (subject: string): Promise<string | null> =>
      (await db.query(`SELECT id FROM app_user WHERE issuer = $1 AND subject = $2`, [issuer, subject]))[0]?.id ?? null;
    const operatorId = await userId(demoOperatorSubject);
    const recorderId = await userId(demoRecorderSubject);

    for (const s of demoStudies) {
      const ended = new Date(now.getTime() - s.endedHoursAgo * 3_600_000);
      const started = new Date(ended.getTime() - s.durationMinutes * 60_000);
      const details: Details = {
        encounter: s.encounter,
        procedureStartedAt: started.toISOString(),
        procedureEndedAt: ended.toISOString(),
        operatorId,
        referringName: s.referring.name,
        referringEmail: s.referring.email,
        indication: s.indication,
        clinicalQuestion: s.clinicalQuestion,
        accessSite: s.accessSite,
        guideFrench: s.guideFrench,
      };
      const sections = [columnValues(detailsColumns, details), columnValues(setupColumns, s.setup), columnValues(findingsColumns, s.findings)];
      const names = sections.flatMap((x) => x.names);
      const values = [s.accession, 'draft', s.vasoreactivity.nitrateReversal, recorderId, started, s.mrn, ...sections.flatMap((x) => x.values)];
      // The record was opened shortly before the procedure began.
      const created = await db.query(
        `INSERT INTO study (accession, patient_id, state, nitrate_reversal, created_by, created_at, ${names.join(', ')})
         SELECT $1, p.id, $2, $3, $4, $5::timestamptz - interval '20 minutes', ${names.map((_, i) => `$${i + 7}`).join(', ')}
         FROM patient p WHERE p.mrn = $6
         ON CONFLICT (accession) DO NOTHING
         RETURNING id`,
        values,
      );
      // Measurements first, then the state: a signed study's rows cannot be added afterwards.
      if (created.length === 1) {
        await addMeasurements(db, created[0].id, s);
        if (s.state !== 'draft') await db.query(`UPDATE study SET state = $2 WHERE id = $1`, [created[0].id, s.state]);
      }
    }
  });
}
