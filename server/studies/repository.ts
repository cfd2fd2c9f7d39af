import type { PoolClient } from 'pg';
import { DataSource, Like, Not, type EntityManager } from 'typeorm';
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
import { isEditable } from '../../shared/study/state-machine';
import { RecordNotFoundError } from '../errors';
import { PatientMismatchError, PatientSharedError, StaleVersionError, StudyLockedError } from './errors';
import { codingColumns, detailsColumns, findingsColumns, readSection, selectList, setupColumns, studyValues, vasoreactivityColumns } from './columns';
import { replaceInterventions } from '../coding/study-interventions';
import { lockStudy } from './lock-study';
import { checkOperator } from './operators';
import { preparedOn } from '../db/prepared';
import {
  AcetylcholineDose as DoseRow,
  ThermodilutionInjection as InjectionRow,
  VesselAssessment as VesselRow,
} from '../db/entities/measurement.entities';
import { Patient } from '../db/entities/patient.entity';
import { Study } from '../db/entities/study.entity';

/** Also exported from here for callers that import it with `loadStudy`. */
export { StaleVersionError } from './errors';


type Db = DataSource | EntityManager | PoolClient;
type Intervention = StudySections['coding']['interventions'][number];

/**
 * The study record, in one statement: the row with its patient (numbers cast to float8 there) and its
 * row sections and attachments as JSON arrays, all from one snapshot. A writer locks the study first
 * (`lockStudy`, or the signature's own lock) and reads it after, so the snapshot follows the lock.
 */
export async function loadStudy(db: Db, id: string): Promise<StudyRecord | null> {
  // SQL kept, as a named prepared statement: read on every save, preview and signature (one round trip).
  // eslint-disable-next-line @typescript-eslint/no-explicit-any
  const [row] = await preparedOn<any>(db, `SELECT ${studyRecordColumns} FROM ${studyRecordFrom} WHERE s.id = $1`, [id]);
  return row ? studyRecordOf(row) : null;
}

/**
 * The select list of a study record over `studyRecordFrom` (study `s`, patient `p`), `$1` being the
 * study's id; `studyRecordOf` reads a row of it. For a statement that reads more beside the record
 * (the signing context) in the same round trip.
 */
export const studyRecordColumns = `s.id, s.accession, s.state, s.version, s.created_at, s.updated_at,
            p.mrn, p.family_name, p.given_name, to_char(p.birth_date, 'YYYY-MM-DD') AS birth_date, p.sex,
            ${selectList(detailsColumns, 's', 'details')}, ${selectList(setupColumns, 's', 'setup')}, ${selectList(findingsColumns, 's', 'findings')},
            ${selectList(vasoreactivityColumns, 's', 'vaso')}, ${selectList(codingColumns, 's', 'coding')},
       (SELECT COALESCE(json_agg(json_build_object(
                 'id', v.id, 'vessel', v.vessel, 'segment', v.segment, 'visualStenosisPct', v.visual_stenosis_pct, 'restPa', v.rest_pa, 'restPd', v.rest_pd,
                 'hyperemiaPa', v.hyperemia_pa, 'hyperemiaPd', v.hyperemia_pd, 'consoleFfr', v.console_ffr, 'nhprKind', v.nhpr_kind, 'nhprValue', v.nhpr_value,
                 'wedgePressure', v.wedge_pressure, 'driftPdPa', v.drift_pd_pa, 'driftNotDoneReason', v.drift_not_done_reason, 'timiFlow', v.timi_flow,
                 'correctedFrameCount', v.corrected_frame_count, 'pullbackPattern', v.pullback_pattern, 'decision', v.decision) ORDER BY v.position), '[]')
        FROM vessel_assessment v WHERE v.study_id = $1) AS vessels,
       (SELECT COALESCE(json_agg(json_build_object('vesselAssessmentId', i.vessel_assessment_id, 'phase', i.phase, 'transitSeconds', i.transit_s) ORDER BY i.position), '[]')
        FROM thermodilution_injection i JOIN vessel_assessment v ON v.id = i.vessel_assessment_id WHERE v.study_id = $1) AS injections,
       (SELECT COALESCE(json_agg(json_build_object(
                 'id', d.id, 'vessel', d.vessel, 'micrograms', d.micrograms, 'constrictionPct', d.constriction_pct, 'symptoms', d.symptoms, 'ischemicEcg', d.ischemic_ecg,
                 'heartRate', d.heart_rate, 'systolic', d.systolic, 'diastolic', d.diastolic, 'rhythm', d.rhythm,
                 'spasmVessel', d.spasm_vessel, 'spasmSegment', d.spasm_segment, 'spasmPattern', d.spasm_pattern) ORDER BY d.position), '[]')
        FROM acetylcholine_dose d WHERE d.study_id = $1) AS doses,
       (SELECT COALESCE(json_agg(json_build_object('id', c.id, 'vessel', c.vessel, 'kind', c.kind, 'branch', c.branch, 'stent', c.stent) ORDER BY c.position), '[]')
        FROM coronary_intervention c WHERE c.study_id = $1) AS interventions,
       (SELECT COALESCE(json_agg(json_build_object(
                 'id', a.id, 'fileName', a.file_name, 'mediaType', a.media_type, 'sizeBytes', a.size_bytes::float8, 'sha256', a.sha256,
                 'uploadedAt', a.uploaded_at, 'uploadedBy', u.display_name) ORDER BY a.uploaded_at, a.id), '[]')
        FROM attachment a LEFT JOIN app_user u ON u.id = a.uploaded_by WHERE a.study_id = $1) AS attachments`;
export const studyRecordFrom = 'study s JOIN patient p ON p.id = s.patient_id';

// eslint-disable-next-line @typescript-eslint/no-explicit-any
export function studyRecordOf(row: any): StudyRecord {
  const parts = partsOf(row);
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
    vessels: parts.vessels.map((v) => toVessel(v, parts.injections)),
    vasoreactivity: { ...readSection(vasoreactivityColumns, row, 'vaso'), doses: parts.doses.map(toDose) },
    coding: { ...readSection(codingColumns, row, 'coding'), interventions: parts.interventions },
    attachments: parts.attachments,
  };
}

/** `numeric` and `smallint` values arrive as JSON numbers (numeric in its exact decimal text, so the same number `Number(text)` gives). */
type VesselFields = Omit<VesselRow, 'studyId' | 'study' | 'position'>;
type InjectionFields = Pick<InjectionRow, 'vesselAssessmentId' | 'phase' | 'transitSeconds'>;
type DoseFields = Omit<DoseRow, 'studyId' | 'study' | 'position'>;
interface StudyParts {
  vessels: VesselFields[];
  injections: InjectionFields[];
  doses: DoseFields[];
  interventions: Intervention[];
  attachments: AttachmentSummary[];
}

/** A study's row sections (vessels with their injections, acetylcholine doses, interventions) and its attachments' summaries, each in its stored order. */
// eslint-disable-next-line @typescript-eslint/no-explicit-any
function partsOf(row: any): StudyParts {
  return {
    vessels: row.vessels,
    injections: row.injections,
    doses: row.doses,
    interventions: row.interventions,
    attachments: (row.attachments as Array<AttachmentSummary>).map((a) => ({ ...a, uploadedAt: new Date(a.uploadedAt).toISOString() })),
  };
}

type PatientRow = Pick<Patient, 'id' | 'familyName' | 'givenName' | 'birthDate' | 'sex'>;
const demographicFields = ['familyName', 'givenName', 'birthDate', 'sex'] as const;
const norm = (s: string) => s.trim().toLowerCase();
/** Which demographics differ (ignoring case and surrounding spaces of names). */
const differences = (row: PatientRow, p: StudySections['patient']) => demographicFields.filter((f) => norm(String(p[f])) !== norm(String(row[f])));
const exactlySame = (row: PatientRow, p: StudySections['patient']) => demographicFields.every((f) => String(p[f]) === String(row[f]));




/**
 * Which patient a study belongs to, never renaming anyone else:
 * - the MRN is on file → that patient, if the demographics agree (else 409, naming what differs);
 * - the study's own patient with no other study → corrected in place, exactly as typed (so a
 *   half-typed MRN never leaves stray patients behind);
 * - otherwise a new patient; a patient the study leaves behind with no study is removed.
 * Rows are locked in a fixed order (study first, then patients) so concurrent writers queue.
 */
async function resolvePatient(db: EntityManager, patient: StudySections['patient'], studyId: string | null, currentPatientId: string | null): Promise<{ patientId: string; leftBehind: string | null }> {
  const othersOf = (patientId: string) => db.count(Study, { where: studyId === null ? { patientId } : { patientId, id: Not(studyId) } });
  const correct = (patientId: string) =>
    db.update(Patient, { id: patientId }, { mrn: patient.mrn, familyName: patient.familyName, givenName: patient.givenName, birthDate: patient.birthDate, sex: patient.sex });
  /** A patient row, locked until the transaction ends; `birthDate` as YYYY-MM-DD. */
  const lockedPatient = async (where: { mrn: string } | { id: string }): Promise<PatientRow | undefined> =>
    (await db.findOne(Patient, { where, select: { id: true, familyName: true, givenName: true, birthDate: true, sex: true }, lock: { mode: 'pessimistic_write' } })) ?? undefined;
  const onFileRow = () => lockedPatient({ mrn: patient.mrn });
  const linkTo = (row: PatientRow) => {
    const diff = differences(row, patient);
    if (diff.length) throw new PatientMismatchError(patient.mrn, diff);
    return row.id;
  };

  // The study's own patient, locked so nobody adds a study to it while it is being corrected.
  const current = currentPatientId ? await lockedPatient({ id: currentPatientId }) : undefined;
  const soleStudy = current ? (await othersOf(current.id)) === 0 : false;

  let chosen: string;
  const onFile = await onFileRow();
  const stay = { patientId: current?.id ?? '', leftBehind: null };
  if (onFile && current && onFile.id === current.id) {
    if (exactlySame(onFile, patient)) return stay;
    if (soleStudy) {
      await correct(current.id);
      return stay;
    }
    const diff = differences(onFile, patient);
    if (diff.length) throw new PatientSharedError(diff);
    return stay; // only case or spacing differs: the record on file stays as it is
  } else if (onFile) {
    chosen = linkTo(onFile);
  } else if (current && soleStudy) {
    await correct(current.id);
    return stay;
  } else {
    // Two writers may bring the same new MRN at once: the second links to the first's row.
    const { raw } = await db
      .createQueryBuilder()
      .insert()
      .into(Patient)
      .values({ mrn: patient.mrn, familyName: patient.familyName, givenName: patient.givenName, birthDate: patient.birthDate, sex: patient.sex })
      .orUpdate([], ['mrn']) // ON CONFLICT (mrn) DO NOTHING
      .updateEntity(false)
      .returning(['id'])
      .execute();
    const inserted = (raw as Pick<Patient, 'id'>[])[0];
    chosen = inserted ? inserted.id : linkTo((await onFileRow())!);
  }
  // A patient the study moves away from, with no other study, is removed once the study points elsewhere.
  return { patientId: chosen, leftBehind: current && soleStudy && chosen !== current.id ? current.id : null };
}

async function removeIfUnused(db: EntityManager, patientId: string | null): Promise<void> {
  if (!patientId) return;
  await db
    .createQueryBuilder()
    .delete()
    .from(Patient)
    .where('id = :patientId', { patientId })
    .andWhere('NOT EXISTS (SELECT 1 FROM study s WHERE s.patient_id = patient.id)')
    .execute();
}


/** Locks the study row for the rest of the transaction and refuses when it is signed. */
export async function lockEditableStudy(db: EntityManager, id: string): Promise<{ patientId: string; version: number }> {
  const row = await lockStudy(db, id);
  if (!row) throw new RecordNotFoundError('No study has this id.');
  if (!isEditable(row.state)) throw new StudyLockedError(row.state);
  return { patientId: row.patientId, version: row.version };
}

/** A readable, unique accession when the hospital's system has not supplied one. */
async function nextAccession(db: EntityManager, at: Date): Promise<string> {
  const day = at.toISOString().slice(0, 10).replaceAll('-', '');
  const n = (await db.count(Study, { where: { accession: Like(`ISB-${day}-%`) } })) + 1;
  return `ISB-${day}-${String(n).padStart(4, '0')}-${Math.random().toString(36).slice(2, 6).toUpperCase()}`;
}

/** Runs `work` in the caller's transaction (an EntityManager), or in a new one (a DataSource). */
function inTransaction<T>(db: DataSource | EntityManager, work: (db: EntityManager) => Promise<T>): Promise<T> {
  return db instanceof DataSource ? db.transaction(work) : work(db);
}

/** Creates a study (and its patient, unless the MRN is on file) in one transaction, the caller's when given one; returns its id. */
export async function createStudy(dataSource: DataSource | EntityManager, input: CreateStudy, createdBy: string | null): Promise<string> {
  return inTransaction(dataSource, async (db) => {
    await checkOperator(db, input.details?.operatorId);
    const { patientId } = await resolvePatient(db, input.patient, null, null);
    const details = { ...emptyDetails(), ...input.details };
    const accession = await nextAccession(db, new Date());
    const { identifiers } = await db.insert(Study, { ...studyValues(db, detailsColumns, details), accession, patientId, createdBy });
    const id = (identifiers[0] as Pick<Study, 'id'>).id;
    return id;
  });
}

type WritableSections = Partial<Pick<StudySections, 'details' | 'setup' | 'findings' | 'vasoreactivity' | 'vessels' | 'coding'>>;

/**
 * Writes whole sections of a study (inside the caller's transaction, the row already locked): the
 * study's own columns, then its vessel and dose rows.
 */
export async function writeSections(db: EntityManager, id: string, sections: WritableSections, options: { patientId?: string; bumpVersion?: boolean } = {}): Promise<void> {
  await db.update(
    Study,
    { id },
    {
      ...(options.patientId ? { patientId: options.patientId } : {}),
      ...(sections.details ? studyValues(db, detailsColumns, sections.details) : {}),
      ...(sections.setup ? studyValues(db, setupColumns, sections.setup) : {}),
      ...(sections.findings ? studyValues(db, findingsColumns, sections.findings) : {}),
      ...(sections.vasoreactivity ? studyValues(db, vasoreactivityColumns, sections.vasoreactivity) : {}),
      ...(sections.coding ? studyValues(db, codingColumns, sections.coding) : {}),
      // Named, so TypeORM does not add its own `version + 1`; updated_at is set to now() by TypeORM.
      version: options.bumpVersion ? () => 'version + 1' : () => 'version',
    },
  );
  if (sections.vessels) await replaceVessels(db, id, sections.vessels);
  if (sections.vasoreactivity) await replaceDoses(db, id, sections.vasoreactivity.doses);
  if (sections.coding) await replaceInterventions(db, id, sections.coding.interventions);
}

/**
 * Replaces the sections the patch carries, in one transaction (the caller's when given one): the
 * row is locked, the version and the state checked, the sections written, and the result read back
 * — all before commit, so the version returned is exactly the one written.
 */
export async function patchStudy(dataSource: DataSource | EntityManager, id: string, patch: PatchStudy): Promise<{ changed: string[]; record: StudyRecord }> {
  return inTransaction(dataSource, async (db) => {
    const current = await lockEditableStudy(db, id);
    if (current.version !== patch.version) throw new StaleVersionError((await loadStudy(db, id))!);
    await checkOperator(db, patch.details?.operatorId);
    let leftBehind: string | null = null;
    let patientId: string | undefined;
    if (patch.patient) {
      const resolved = await resolvePatient(db, patch.patient, id, current.patientId);
      leftBehind = resolved.leftBehind;
      patientId = resolved.patientId;
    }
    await writeSections(db, id, patch, { patientId, bumpVersion: true });
    await removeIfUnused(db, leftBehind);
    const changed = Object.keys(patch).filter((k) => k !== 'version');
    return { changed, record: (await loadStudy(db, id))! };
  });
}

/** Stored rows → the record's vessel, transit times in injection order. */
function toVessel(v: VesselFields, injections: InjectionFields[]): VesselAssessment {
  const mine = injections.filter((i) => i.vesselAssessmentId === v.id);
  return {
    id: v.id,
    vessel: v.vessel as VesselAssessment['vessel'],
    segment: v.segment as VesselAssessment['segment'],
    visualStenosisPct: v.visualStenosisPct,
    restPa: v.restPa,
    restPd: v.restPd,
    hyperemiaPa: v.hyperemiaPa,
    hyperemiaPd: v.hyperemiaPd,
    consoleFfr: v.consoleFfr,
    nhprKind: v.nhprKind as VesselAssessment['nhprKind'],
    nhprValue: v.nhprValue,
    wedgePressure: v.wedgePressure,
    driftPdPa: v.driftPdPa,
    driftNotDoneReason: v.driftNotDoneReason,
    timiFlow: v.timiFlow as VesselAssessment['timiFlow'],
    correctedFrameCount: v.correctedFrameCount,
    restTransit: mine.filter((i) => i.phase === 'rest').map((i) => i.transitSeconds),
    hyperemiaTransit: mine.filter((i) => i.phase === 'hyperemia').map((i) => i.transitSeconds),
    pullbackPattern: v.pullbackPattern as VesselAssessment['pullbackPattern'],
    decision: v.decision as VesselAssessment['decision'],
  };
}

function toDose(d: DoseFields): AcetylcholineDose {
  return {
    id: d.id,
    vessel: d.vessel as AcetylcholineDose['vessel'],
    micrograms: d.micrograms,
    constrictionPct: d.constrictionPct,
    symptoms: d.symptoms,
    ischemicEcg: d.ischemicEcg,
    heartRate: d.heartRate,
    systolic: d.systolic,
    diastolic: d.diastolic,
    rhythm: d.rhythm as AcetylcholineDose['rhythm'],
    spasmVessel: d.spasmVessel as AcetylcholineDose['spasmVessel'],
    spasmSegment: d.spasmSegment as AcetylcholineDose['spasmSegment'],
    spasmPattern: d.spasmPattern as AcetylcholineDose['spasmPattern'],
  };
}

/** A section's rows are replaced whole: the client owns their ids and their order. */
export async function replaceVessels(db: EntityManager, studyId: string, vessels: VesselAssessment[]): Promise<void> {
  await db.delete(VesselRow, { studyId });
  if (vessels.length === 0) return;
  await db.insert(
    VesselRow,
    vessels.map(({ restTransit: _rest, hyperemiaTransit: _hyp, ...v }, position) => ({ ...v, studyId, position })),
  );
  const injections = vessels.flatMap((v) => [
    ...v.restTransit.map((t, position) => ({ vesselAssessmentId: v.id, phase: 'rest' as const, position, transitSeconds: t })),
    ...v.hyperemiaTransit.map((t, position) => ({ vesselAssessmentId: v.id, phase: 'hyperemia' as const, position, transitSeconds: t })),
  ]);
  if (injections.length) await db.insert(InjectionRow, injections);
}

export async function replaceDoses(db: EntityManager, studyId: string, doses: AcetylcholineDose[]): Promise<void> {
  await db.delete(DoseRow, { studyId });
  if (doses.length) await db.insert(DoseRow, doses.map((d, position) => ({ ...d, studyId, position })));
}

export { emptyDetails, emptySetup, emptyFindings };
