import { emptyDose, emptyFindings, emptyVessel, type AcetylcholineDose, type Details, type Findings, type Setup, type VesselAssessment } from '../../shared/study/schema';
import type { StudyState } from '../../shared/study/vocabulary';

/**
 * The demo scenario: an invented hospital, invented clinicians and invented patients.
 * Any likeness to real people is accidental.
 */
export const demoHospital = {
  name: 'Saltmarsh Bay Regional Hospital',
  lab: 'Cardiac Catheterization Laboratory, level 3',
};

export const demoUsers = [
  { subject: 'demo-staff', username: 'ivarga', email: 'ines.varga@saltmarsh.example', displayName: 'Ines Varga, RN', role: 'staff', groups: ['cath-lab-staff'] },
  { subject: 'demo-physician', username: 'koduya', email: 'dr.oduya@saltmarsh.example', displayName: 'Dr. Kofi Oduya', role: 'physician', groups: ['cardiology-physicians'] },
  { subject: 'demo-coder', username: 'mlinde', email: 'mara.linde@saltmarsh.example', displayName: 'Mara Linde, CCS', role: 'coder', groups: ['him-coding'] },
  { subject: 'demo-chief', username: 'shalvorsen', email: 'dr.halvorsen@saltmarsh.example', displayName: 'Dr. Sigrid Halvorsen', role: 'chief', groups: ['cardiology-chiefs'] },
  { subject: 'demo-admin', username: 'tbrandt', email: 'teo.brandt@saltmarsh.example', displayName: 'Teo Brandt', role: 'admin', groups: ['isobar-administrators'] },
  { subject: 'demo-norole', username: 'pvisitor', email: 'visitor@saltmarsh.example', displayName: 'Pat Visitor', role: null, groups: ['facilities'] },
] as const;

export const demoPatients = [
  { mrn: 'SB-104233', familyName: 'Quenneville', givenName: 'Harold', birthDate: '1956-03-14', sex: 'male' },
  { mrn: 'SB-118902', familyName: 'Amari', givenName: 'Leontyne', birthDate: '1961-11-02', sex: 'female' },
  { mrn: 'SB-120517', familyName: 'Pryce-Obi', givenName: 'Delphine', birthDate: '1972-07-29', sex: 'female' },
  { mrn: 'SB-123088', familyName: 'Tamsin', givenName: 'Yusuf', birthDate: '1968-01-19', sex: 'male' },
  { mrn: 'SB-125640', familyName: 'Ahlgren', givenName: 'Beatrix', birthDate: '1979-09-05', sex: 'female' },
  { mrn: 'SB-127711', familyName: 'Moravec', givenName: 'Ilse', birthDate: '1964-05-23', sex: 'female' },
] as const;

/** The subject of the demo user who operates every demo case. */
export const demoOperatorSubject = 'demo-physician';
/** The subject of the demo user who opened every demo record. */
export const demoRecorderSubject = 'demo-staff';

/** A vessel row as the scenario writes it; the seed gives it its row id. */
export type DemoVessel = Omit<VesselAssessment, 'id'>;
/** An acetylcholine dose as the scenario writes it; the seed gives it its row id. */
export type DemoDose = Omit<AcetylcholineDose, 'id'>;

export interface DemoStudy {
  accession: string;
  mrn: string;
  state: StudyState;
  /** Hours before "now" at which the procedure ended, so the scenario always looks current. */
  endedHoursAgo: number;
  durationMinutes: number;
  encounter: string;
  indication: string;
  clinicalQuestion: 'intermediate-lesion' | 'angina-no-obstruction';
  referring: { name: string; email: string };
  accessSite: 'right-radial' | 'left-radial' | 'right-femoral';
  guideFrench: number;
  patientFacts: Pick<Details, 'weightKg' | 'heightCm' | 'anginaPresent' | 'anginaCharacter'>;
  setup: Setup;
  vessels: DemoVessel[];
  vasoreactivity: { doses: DemoDose[]; nitrateReversal: boolean | null; reversalNitroglycerinMicrograms: number | null; reversalNitroglycerinAtMinute: number | null };
  findings: Findings;
  /** For an amended study: what the addendum changed, and why. */
  /** The addendum after the first signature: its reason and the fields it corrects. */
  amendment?: { reason: string; details: Partial<Details>; findings?: Partial<Findings> };
}

/** A vessel row: the shared empty vessel (ids are given when seeding) with the fields that were measured. */
const vessel = (fields: Partial<DemoVessel> & Pick<DemoVessel, 'vessel'>): DemoVessel => {
  const { id: _id, ...empty } = emptyVessel('', fields.vessel);
  return { ...empty, ...fields };
};

/** Acetylcholine into the left coronary: dose (µg), diameter reduction (%), symptoms, ischaemic ECG, heart rate, BP. */
const doses = (rows: [number, number, boolean, boolean, number, number, number][]): DemoDose[] =>
  rows.map(([micrograms, constrictionPct, symptoms, ischemicEcg, heartRate, systolic, diastolic]) => {
    const { id: _id, ...empty } = emptyDose('', 'LAD');
    return { ...empty, micrograms, constrictionPct, symptoms, ischemicEcg, heartRate, systolic, diastolic, rhythm: 'sinus' };
  });

const noReversal = { nitrateReversal: null, reversalNitroglycerinMicrograms: null, reversalNitroglycerinAtMinute: null };
const findings = (fields: Partial<Findings>): Findings => ({ ...emptyFindings(), complicationKinds: ['none'], ...fields });

/**
 * Setup and quality steps done as the lab's checklist asks. A lesion study gives nitroglycerin before
 * the measurements; a coronary function test only after acetylcholine, which it would otherwise blunt.
 */
const checklist = (
  hyperaemia: Pick<Setup, 'hyperemicRoute' | 'hyperemicDose' | 'hyperemicDoseUnit'>,
  heparinUnits: number,
  baseline: [heartRate: number, systolic: number, diastolic: number, lvedp: number],
  nitrateTiming: NonNullable<Setup['nitrateTiming']> = 'before-measurements',
): Setup => ({
  transducerZeroed: true,
  nitratesGiven: true,
  nitrateTiming,
  nitrateDoseMicrograms: 200,
  baselineHeartRate: baseline[0],
  baselineSystolic: baseline[1],
  baselineDiastolic: baseline[2],
  baselineRhythm: 'sinus',
  lvedp: baseline[3],
  equalizedInAorta: true,
  introducerRemoved: true,
  wirePosition: 'distal-third',
  hyperemicAgent: 'adenosine',
  ...hyperaemia,
  heparinUnits,
});
const ivAdenosine = { hyperemicRoute: 'intravenous', hyperemicDose: 140, hyperemicDoseUnit: 'ug/kg/min' } as const;
const icAdenosine = { hyperemicRoute: 'intracoronary', hyperemicDose: 100, hyperemicDoseUnit: 'ug' } as const;

const referrers = {
  osei: { name: 'Dr. Wendell Osei-Marsh', email: 'w.oseimarsh@saltmarsh.example' },
  castellane: { name: 'Dr. Priya Castellane', email: 'p.castellane@saltmarsh.example' },
  fenwick: { name: 'Dr. Annika Fenwick', email: 'annika.fenwick@saltmarsh.example' },
};

/**
 * Six cases, one per story the demo tells. The pressures and transit times are chosen so the
 * physiology core reaches the intended finding (see tests/integration/demo-seed.test.ts).
 */
export const demoStudies: DemoStudy[] = [
  {
    // Intermediate proximal LAD lesion with a low FFR, treated.
    accession: 'SBR-26-0411',
    mrn: 'SB-104233',
    state: 'signed',
    endedHoursAgo: 50,
    durationMinutes: 70,
    encounter: 'ENC-26-0411',
    indication: 'Intermediate proximal LAD lesion on angiography, exertional angina',
    clinicalQuestion: 'intermediate-lesion',
    referring: referrers.osei,
    accessSite: 'right-radial',
    guideFrench: 6,
    patientFacts: { weightKg: 84, heightCm: 178, anginaPresent: true, anginaCharacter: 'stable' },
    setup: checklist(ivAdenosine, 5000, [68, 132, 74, 14]),
    vessels: [
      vessel({
        vessel: 'LAD',
        segment: '6',
        visualStenosisPct: 60,
        restPa: 96,
        restPd: 84,
        hyperemiaPa: 88,
        hyperemiaPd: 63,
        consoleFfr: 0.72,
        nhprKind: 'diastolic',
        nhprValue: 0.84,
        driftPdPa: 0.99,
        pullbackPattern: 'focal',
        decision: 'pci',
      }),
    ],
    vasoreactivity: { doses: [], ...noReversal },
    findings: findings({
      contrastMl: 145,
      fluoroscopyMinutes: 14.5,
      impression:
        'Intermediate proximal LAD stenosis (60% visually) is haemodynamically significant: FFR 0.72 with a focal pressure step-up across the lesion on pull-back; diastolic resting ratio 0.84 agrees. Treated with a drug-eluting stent in the same sitting, good angiographic result.',
      plan: 'Dual antiplatelet therapy for 6 months, then a single antiplatelet agent. Continue statin. Cardiac rehabilitation referral. Clinic review in 6 weeks.',
      airKermaMGy: 420,
      doseAreaProductGyCm2: 38.5,
    }),
  },
  {
    // Moderate mid RCA lesion with a normal FFR, deferred.
    accession: 'SBR-26-0412',
    mrn: 'SB-118902',
    state: 'signed',
    endedHoursAgo: 30,
    durationMinutes: 45,
    encounter: 'ENC-26-0412',
    indication: 'Moderate mid RCA lesion, atypical chest pain',
    clinicalQuestion: 'intermediate-lesion',
    referring: referrers.castellane,
    accessSite: 'right-radial',
    guideFrench: 6,
    patientFacts: { weightKg: 71, heightCm: 164, anginaPresent: true, anginaCharacter: 'stable' },
    setup: checklist(icAdenosine, 4000, [72, 128, 70, 12]),
    vessels: [
      vessel({
        vessel: 'RCA',
        segment: '2',
        visualStenosisPct: 50,
        restPa: 92,
        restPd: 87,
        hyperemiaPa: 86,
        hyperemiaPd: 74,
        consoleFfr: 0.86,
        nhprKind: 'diastolic',
        nhprValue: 0.93,
        driftPdPa: 1.0,
        pullbackPattern: 'focal',
        decision: 'defer',
      }),
    ],
    vasoreactivity: { doses: [], ...noReversal },
    findings: findings({
      contrastMl: 70,
      fluoroscopyMinutes: 5.5,
      impression: 'Moderate mid RCA stenosis (50% visually) is not haemodynamically significant: FFR 0.86, diastolic resting ratio 0.93. Intervention deferred.',
      plan: 'Medical therapy: continue antiplatelet and statin, optimise anti-anginal treatment. Reassess if symptoms change.',
      airKermaMGy: 210,
      doseAreaProductGyCm2: 19.2,
    }),
  },
  {
    // Angina without obstruction: structural microvascular dysfunction, no spasm.
    accession: 'SBR-26-0413',
    mrn: 'SB-120517',
    state: 'awaiting-signature',
    endedHoursAgo: 5,
    durationMinutes: 80,
    encounter: 'ENC-26-0413',
    indication: 'Angina with no obstructive disease on prior CT angiography',
    clinicalQuestion: 'angina-no-obstruction',
    referring: referrers.fenwick,
    accessSite: 'right-radial',
    guideFrench: 6,
    patientFacts: { weightKg: 66, heightCm: 169, anginaPresent: true, anginaCharacter: 'mixed' },
    setup: checklist(ivAdenosine, 4000, [64, 118, 66, 9], 'after-acetylcholine'),
    vessels: [
      vessel({
        vessel: 'LAD',
        segment: '7',
        visualStenosisPct: 20,
        restPa: 90,
        restPd: 85,
        hyperemiaPa: 85,
        hyperemiaPd: 75,
        consoleFfr: 0.88,
        driftPdPa: 1.01,
        restTransit: [0.71, 0.74, 0.73],
        hyperemiaTransit: [0.44, 0.46, 0.46],
        pullbackPattern: 'not-done',
        decision: 'medical-therapy',
      }),
    ],
    vasoreactivity: { doses: doses([[2, 0, false, false, 66, 120, 68], [20, 10, false, false, 64, 118, 66], [100, 15, false, false, 62, 116, 66]]), ...noReversal },
    findings: findings({
      contrastMl: 60,
      fluoroscopyMinutes: 7.5,
      impression:
        'No obstructive coronary disease (LAD FFR 0.88). Coronary flow reserve reduced (1.6) with raised microvascular resistance (IMR 34): microvascular angina, structural type. Acetylcholine 2, 20 and 100 µg into the left coronary did not provoke spasm.',
      plan: 'Start a beta-blocker and an ACE inhibitor; continue statin. Lifestyle advice. Clinic review in 8 weeks.',
      airKermaMGy: 260,
      doseAreaProductGyCm2: 22.8,
    }),
  },
  {
    // Rest angina at night: epicardial spasm with normal microvascular function.
    accession: 'SBR-26-0414',
    mrn: 'SB-123088',
    state: 'draft',
    endedHoursAgo: 2,
    durationMinutes: 85,
    encounter: 'ENC-26-0414',
    indication: 'Rest angina at night, no obstructive disease',
    clinicalQuestion: 'angina-no-obstruction',
    referring: referrers.osei,
    accessSite: 'right-radial',
    guideFrench: 6,
    patientFacts: { weightKg: 79, heightCm: 181, anginaPresent: true, anginaCharacter: 'rest' },
    setup: checklist(ivAdenosine, 5000, [58, 124, 72, 11], 'after-acetylcholine'),
    vessels: [
      vessel({
        vessel: 'LAD',
        segment: '7',
        visualStenosisPct: 10,
        restPa: 94,
        restPd: 90,
        hyperemiaPa: 88,
        hyperemiaPd: 80,
        consoleFfr: 0.91,
        driftPdPa: 1.0,
        restTransit: [0.82, 0.86, 0.84],
        hyperemiaTransit: [0.24, 0.26, 0.25],
        pullbackPattern: 'not-done',
        decision: 'medical-therapy',
      }),
    ],
    vasoreactivity: { doses: doses([[2, 0, false, false, 58, 124, 72], [20, 15, false, false, 57, 122, 70], [100, 95, true, true, 52, 104, 62]]).map((d, i) =>
      i === 2 ? { ...d, spasmVessel: 'LAD', spasmSegment: '7', spasmPattern: 'diffuse' } : d,
    ),
    nitrateReversal: true, reversalNitroglycerinMicrograms: 200, reversalNitroglycerinAtMinute: 52 },
    findings: findings({
      complications: 'No complication. The provoked chest pain and anterior ST elevation were relieved by intracoronary nitroglycerin within 2 minutes.',
      contrastMl: 75,
      fluoroscopyMinutes: 9,
      impression:
        'No obstructive disease (LAD FFR 0.91); normal coronary flow reserve (3.4) and IMR (20). Acetylcholine 100 µg into the left coronary provoked 95% constriction of the mid-to-distal LAD with the usual chest pain and ischaemic ECG changes, reversed by nitroglycerin: epicardial vasospasm.',
      plan: 'Start a calcium channel blocker; sublingual nitrate as needed. Smoking cessation support. Clinic review in 6 weeks.',
      airKermaMGy: 300,
      doseAreaProductGyCm2: 27.4,
    }),
  },
  {
    // Everything normal, including acetylcholine.
    accession: 'SBR-26-0415',
    mrn: 'SB-125640',
    state: 'amended',
    endedHoursAgo: 75,
    durationMinutes: 80,
    encounter: 'ENC-26-0415',
    indication: 'Exertional chest pain, normal non-invasive tests',
    clinicalQuestion: 'angina-no-obstruction',
    referring: referrers.castellane,
    accessSite: 'right-radial',
    amendment: {
      reason: 'Access site entered in error: the procedure was done from the right femoral artery.',
      details: { accessSite: 'right-femoral' },
      findings: { complications: 'Femoral access closed with manual compression.' },
    },
    guideFrench: 6,
    patientFacts: { weightKg: 58, heightCm: 160, anginaPresent: true, anginaCharacter: 'stable' },
    setup: checklist(ivAdenosine, 4500, [70, 121, 68, 10], 'after-acetylcholine'),
    vessels: [
      vessel({
        vessel: 'LAD',
        visualStenosisPct: 0,
        restPa: 98,
        restPd: 94,
        hyperemiaPa: 90,
        hyperemiaPd: 83,
        consoleFfr: 0.92,
        driftPdPa: 0.99,
        restTransit: [0.78, 0.8, 0.76],
        hyperemiaTransit: [0.26, 0.27, 0.25],
        pullbackPattern: 'not-done',
        decision: 'defer',
      }),
    ],
    vasoreactivity: { doses: doses([[2, 0, false, false, 70, 121, 68], [20, 5, false, false, 70, 120, 68], [100, 10, false, false, 68, 119, 66], [200, 15, false, false, 66, 118, 66]]), ...noReversal },
    findings: findings({
      complications: 'Radial compression band applied, removed after 2 hours.',
      contrastMl: 65,
      fluoroscopyMinutes: 8,
      impression:
        'No obstructive disease (LAD FFR 0.92), normal coronary flow reserve (3.0) and IMR (22), acetylcholine up to 200 µg negative: no coronary cause of the chest pain was found.',
      plan: 'Reassurance. Stop anti-anginal medication. Evaluate non-cardiac causes with the referring clinician.',
      airKermaMGy: 240,
      doseAreaProductGyCm2: 21.6,
    }),
  },
  {
    // Functional microvascular dysfunction, waiting too long for signature; one drift check out of range.
    accession: 'SBR-26-0416',
    mrn: 'SB-127711',
    state: 'awaiting-signature',
    endedHoursAgo: 40,
    durationMinutes: 90,
    encounter: 'ENC-26-0416',
    indication: 'Angina with no obstructive disease, dyspnoea',
    clinicalQuestion: 'angina-no-obstruction',
    referring: referrers.fenwick,
    accessSite: 'left-radial',
    guideFrench: 6,
    patientFacts: { weightKg: 73, heightCm: 166, anginaPresent: true, anginaCharacter: 'mixed' },
    setup: checklist(ivAdenosine, 4000, [76, 138, 80, 13], 'after-acetylcholine'),
    vessels: [
      vessel({
        vessel: 'LAD',
        segment: '7',
        visualStenosisPct: 15,
        restPa: 92,
        restPd: 87,
        hyperemiaPa: 84,
        hyperemiaPd: 76,
        consoleFfr: 0.9,
        driftPdPa: 0.99,
        restTransit: [0.38, 0.4, 0.39],
        hyperemiaTransit: [0.22, 0.23, 0.21],
        pullbackPattern: 'not-done',
        decision: 'medical-therapy',
      }),
      vessel({
        vessel: 'LCX',
        segment: '13',
        visualStenosisPct: 30,
        restPa: 92,
        restPd: 88,
        hyperemiaPa: 84,
        hyperemiaPd: 77,
        consoleFfr: 0.92,
        // Out of the 0.98–1.02 window on purpose: the quality banner shows it.
        driftPdPa: 1.03,
        pullbackPattern: 'diffuse',
        decision: 'defer',
      }),
    ],
    vasoreactivity: { doses: doses([[2, 0, false, false, 76, 138, 80], [20, 10, false, false, 75, 136, 80], [100, 25, false, false, 74, 134, 78], [200, 40, false, false, 72, 132, 78]]), ...noReversal },
    findings: findings({
      contrastMl: 90,
      fluoroscopyMinutes: 11,
      impression:
        'No obstructive disease (LAD FFR 0.90; circumflex FFR 0.92, drift check 1.03 — read with caution). Reduced coronary flow reserve (1.8) with normal IMR (17) and a short resting transit time: microvascular angina, functional type. Acetylcholine up to 200 µg: 40% constriction without symptoms or ECG changes — endothelial dysfunction, not spasm.',
      plan: 'Start a beta-blocker; continue statin. Clinic review in 8 weeks with symptom diary.',
      airKermaMGy: 350,
      doseAreaProductGyCm2: 31.0,
    }),
  },
];
