import { randomUUID } from 'node:crypto';
import request from 'supertest';
import { emptyFindings, emptyVessel, type StudyRecord } from '../../shared/study/schema';

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
