import { analyzeStudy, defaultThresholds, type Thresholds } from '../../../shared/physiology';
import { emptyDetails, emptyFindings, emptySetup, type StudySections } from '../../../shared/study/schema';
import { toPhysiologyInput } from '../../../shared/study/to-physiology';
import { demoPatients, demoStudies, type DemoStudy } from '../../../server/demo/scenario';
import { renderNarrative } from '../../../server/report-document/render';
import { buildReportView, type ReportInput, type ReportStudy } from '../../../server/report-document/view-model';

/** Stable invented row ids, so views built from the same study are identical. */
const uuid = (n: number) => `00000000-0000-4000-8000-${String(n).padStart(12, '0')}`;

/** Vasoreactivity fields that not every version of the record has; empty unless the scenario sets them. */

/** A demo scenario study as the report builder receives it (ids and times fixed for tests). */
export function reportStudyFromDemo(demo: DemoStudy, index = 0): ReportStudy {
  const patient = demoPatients.find((p) => p.mrn === demo.mrn)!;
  const start = new Date(Date.UTC(2026, 10, 30, 8, 0) - demo.endedHoursAgo * 3600_000);
  const end = new Date(start.getTime() + demo.durationMinutes * 60_000);
  return {
    id: uuid(1000 + index),
    accession: demo.accession,
    patient: { ...patient },
    details: {
      ...emptyDetails(),
      encounter: demo.encounter,
      procedureStartedAt: start.toISOString(),
      procedureEndedAt: end.toISOString(),
      operatorId: uuid(1),
      referringName: demo.referring.name,
      referringEmail: demo.referring.email,
      indication: demo.indication,
      clinicalQuestion: demo.clinicalQuestion,
      accessSite: demo.accessSite,
      guideFrench: demo.guideFrench,
      ...demo.patientFacts,
    },
    setup: { ...emptySetup(), ...demo.setup },
    vessels: demo.vessels.map((v, i) => ({ ...v, id: uuid(2000 + index * 20 + i) })),
    vasoreactivity: {
      nitrateReversal: demo.vasoreactivity.nitrateReversal,
      reversalNitroglycerinMicrograms: demo.vasoreactivity.reversalNitroglycerinMicrograms,
      reversalNitroglycerinAt: null,
      doses: demo.vasoreactivity.doses.map((d, i) => ({ ...d, id: uuid(3000 + index * 20 + i) })),
    },
    findings: { ...emptyFindings(), ...demo.findings },
  };
}

export const demoReportStudies = (): ReportStudy[] => demoStudies.map((d, i) => reportStudyFromDemo(d, i));

export function analysisOf(study: Pick<StudySections, 'vessels' | 'vasoreactivity'>, thresholds: Thresholds = defaultThresholds) {
  return analyzeStudy({ ...toPhysiologyInput(study), thresholds });
}

/** The view of a study with the default thresholds, signed or not. */
export function viewOf(study: ReportStudy, extra: Partial<ReportInput> = {}) {
  return buildReportView({
    study,
    analysis: analysisOf(study, extra.thresholds ?? defaultThresholds),
    thresholds: defaultThresholds,
    people: { operator: 'Dr. Kofi Oduya' },
    hospital: { name: 'Saltmarsh Bay Regional Hospital', lab: 'Cardiac Catheterization Laboratory, level 3' },
    ...extra,
  });
}

/** The narrative of a study with the default thresholds (`viewOf`), text and HTML. */
export const render = (s: ReportStudy, extra: Parameters<typeof viewOf>[1] = {}) => renderNarrative(viewOf(s, extra));

/** One section of the plain-text narrative: the lines under `heading` up to the next heading; null when absent. */
export function section(text: string, heading: string): string | null {
  const start = text.indexOf(`\n${heading}\n`);
  if (start < 0) return null;
  const rest = text.slice(start + heading.length + 2);
  const end = rest.search(/\n\n[A-Z][A-Z :]+\n/);
  return end < 0 ? rest : rest.slice(0, end);
}
