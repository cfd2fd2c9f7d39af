import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';
import { demoPatients, type DemoStudy } from '../../server/demo/scenario';

/**
 * A study ready to sign, made through the API as lab staff would: a patient, an indication, one LAD
 * lesion with FFR 72/90 = 0.80 and a drift check, complications "none", impression and plan.
 * `referringEmail` names the referring clinician who is told when the report is signed.
 */
export async function completeStudy(baseUrl: string, staffCookie: string, options: { referringEmail?: string } = {}): Promise<StudyRecord> {
  const post = (path: string) => request(baseUrl).post(path).set('Cookie', staffCookie).set('Origin', baseUrl);
  const created = await post('/api/studies')
    .send({ patient: { mrn: `R-${randomUUID().slice(0, 8)}`, familyName: 'Varnhagen', givenName: 'Tove', birthDate: '1959-02-11', sex: 'female' } })
    .expect(201);
  const study: StudyRecord = created.body;
  const operators = await request(baseUrl).get('/api/operators').set('Cookie', staffCookie).expect(200);
  const res = await request(baseUrl)
    .patch(`/api/studies/${study.id}`)
    .set('Cookie', staffCookie)
    .set('Origin', baseUrl)
    .send({
      version: study.version,
      details: {
        ...study.details,
        indication: 'Intermediate LAD lesion on CT',
        clinicalQuestion: 'intermediate-lesion',
        operatorId: operators.body.items[0].id,
        ...(options.referringEmail ? { referringEmail: options.referringEmail } : {}),
      },
      vessels: [{ ...emptyVessel(randomUUID(), 'LAD'), restPa: 100, restPd: 95, hyperemiaPa: 90, hyperemiaPd: 72, driftPdPa: 1.0, decision: 'pci' }],
      findings: { ...emptyFindings(), complicationKinds: ['none'], impression: 'Significant LAD lesion.', plan: 'Stent.' },
    })
    .expect(200);
  return res.body;
}

/**
 * A study with a demo case's content (a new patient and accession, procedure times around now), made
 * through the API as lab staff would. Signed and amended demo cases are complete, ready to sign.
 */
export async function studyLikeDemo(baseUrl: string, staffCookie: string, demo: DemoStudy): Promise<StudyRecord> {
  const base = demoPatients.find((p) => p.mrn === demo.mrn)!;
  const created = await request(baseUrl)
    .post('/api/studies')
    .set('Cookie', staffCookie)
    .set('Origin', baseUrl)
    .send({ patient: { mrn: `R-${randomUUID().slice(0, 8)}`, familyName: base.familyName, givenName: base.givenName, birthDate: base.birthDate, sex: base.sex } })
    .expect(201);
  const study: StudyRecord = created.body;
  const operators = await request(baseUrl).get('/api/operators').set('Cookie', staffCookie).expect(200);
  const ended = new Date(Date.now() - 3_600_000);
  const started = new Date(ended.getTime() - demo.durationMinutes * 60_000);
  const { doses, reversalNitroglycerinAtMinute, ...vaso } = demo.vasoreactivity;
  const res = await request(baseUrl)
    .patch(`/api/studies/${study.id}`)
    .set('Cookie', staffCookie)
    .set('Origin', baseUrl)
    .send({
      version: study.version,
      details: {
        ...study.details,
        encounter: demo.encounter,
        procedureStartedAt: started.toISOString(),
        procedureEndedAt: ended.toISOString(),
        operatorId: operators.body.items[0].id,
        referringName: demo.referring.name,
        referringEmail: demo.referring.email,
        indication: demo.indication,
        clinicalQuestion: demo.clinicalQuestion,
        accessSite: demo.accessSite,
        guideFrench: demo.guideFrench,
        ...demo.patientFacts,
      },
      setup: demo.setup,
      vessels: demo.vessels.map((v) => ({ ...v, id: randomUUID() })),
      vasoreactivity: {
        ...vaso,
        doses: doses.map((d) => ({ ...d, id: randomUUID() })),
        reversalNitroglycerinAt: reversalNitroglycerinAtMinute === null ? null : new Date(started.getTime() + reversalNitroglycerinAtMinute * 60_000).toISOString(),
      },
      findings: demo.findings,
    })
    .expect(200);
  return res.body;
}
