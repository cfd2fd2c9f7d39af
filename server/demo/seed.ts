import type { DataSource } from 'typeorm';
import type { Details } from '../../shared/study/schema';
import { detailsColumns, findingsColumns, setupColumns, vasoreactivityColumns } from '../studies/columns';
import { replaceDoses, replaceVessels, writeSections } from '../studies/repository';
import { changeStudyState } from '../reports/change-study-state';
import { signStudy } from '../reports/sign-study';
import { demoHospital, demoOperatorSubject, demoPatients, demoRecorderSubject, demoStudies, demoUsers, type DemoStudy } from './scenario';

/** Section columns and their values, in the same order. */
function columnValues<T>(columns: { field: keyof T; column: string }[], section: T): { names: string[]; values: unknown[] } {
  return { names: columns.map((c) => c.column), values: columns.map((c) => section[c.field] ?? null) };
}

/**
 * Loads the demo scenario. Idempotent: rows are keyed by their natural keys (issuer + subject,
 * MRN, accession) and left alone when they already exist, so edits made in the demo survive.
 * A study gets its measurements only in the run that creates it, in the same transaction.
 */
export async function seedDemo(dataSource: DataSource, issuer: string, now = new Date(), hospital: { name: string; lab: string } | null = demoHospital): Promise<void> {
  const toAdvance: { id: string; demo: DemoStudy }[] = [];
  let physician: { id: string; name: string } | null = null;
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
    physician = operatorId ? { id: operatorId, name: demoUsers.find((u) => u.subject === demoOperatorSubject)!.displayName } : null;
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
        ...s.patientFacts,
      };
      const { doses, reversalNitroglycerinAtMinute, ...vaso } = s.vasoreactivity;
      const reversalAt = reversalNitroglycerinAtMinute === null ? null : new Date(started.getTime() + reversalNitroglycerinAtMinute * 60_000).toISOString();
      const sections = [
        columnValues(detailsColumns, details),
        columnValues(setupColumns, s.setup),
        columnValues(findingsColumns, s.findings),
        columnValues(vasoreactivityColumns, { ...vaso, reversalNitroglycerinAt: reversalAt }),
      ];
      const names = sections.flatMap((x) => x.names);
      // Every demo study starts as a draft; later states are reached the way users reach them (below).
      const values = [s.accession, 'draft', recorderId, started, s.mrn, ...sections.flatMap((x) => x.values)];
      // The record was opened shortly before the procedure began.
      const created = await db.query(
        `INSERT INTO study (accession, patient_id, state, created_by, created_at, ${names.join(', ')})
         SELECT $1, p.id, $2, $3, $4::timestamptz - interval '20 minutes', ${names.map((_, i) => `$${i + 6}`).join(', ')}
         FROM patient p WHERE p.mrn = $5
         ON CONFLICT (accession) DO NOTHING
         RETURNING id`,
        values,
      );
      if (created.length === 1) {
        await replaceVessels(db, created[0].id, s.vessels.map((v) => ({ ...v, id: crypto.randomUUID() })));
        await replaceDoses(db, created[0].id, doses.map((d) => ({ ...d, id: crypto.randomUUID() })));
        if (s.state !== 'draft') toAdvance.push({ id: created[0].id, demo: s });
      }
    }
  });
  // Studies past the draft reach their state through the real hand-off and signing code, so signed
  // ones have versions, PDFs and follow-up jobs like any other.
  for (const { id, demo } of toAdvance) await advanceDemoStudy(dataSource, id, demo, physician!, hospital);
}

async function advanceDemoStudy(dataSource: DataSource, studyId: string, demo: DemoStudy, physician: { id: string; name: string }, hospital: { name: string; lab: string } | null): Promise<void> {
  const audit = { actorUserId: physician.id, actorName: physician.name, actorRole: 'physician' as const, clientAddress: null };
  const version = async () => (await dataSource.query(`SELECT version FROM study WHERE id = $1`, [studyId]))[0].version as number;
  await changeStudyState(dataSource, { studyId, action: 'mark-ready', studyVersion: await version(), role: 'physician', audit });
  if (demo.state === 'awaiting-signature') return;
  const signer = { userId: physician.id, displayName: physician.name, role: 'physician' as const };
  await signStudy(dataSource, { studyId, studyVersion: await version(), signer, hospital, audit });
  if (demo.state !== 'amended' || !demo.amendment) return;
  const opened = await changeStudyState(dataSource, { studyId, action: 'open-addendum', studyVersion: await version(), role: 'physician', audit });
  await dataSource.transaction(async (manager) => {
    const { details, findings } = demo.amendment!;
    await writeSections(manager, studyId, { details: { ...opened.details, ...details }, ...(findings ? { findings: { ...opened.findings, ...findings } } : {}) }, { bumpVersion: true });
  });
  await signStudy(dataSource, { studyId, studyVersion: await version(), signer, hospital, audit, reason: demo.amendment.reason });
}
