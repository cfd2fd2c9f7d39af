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

/** Hours before "now" at which each procedure ended, so the scenario always looks current. */
export const demoStudies = [
  { accession: 'SBR-26-0411', mrn: 'SB-104233', state: 'signed', endedHoursAgo: 50, indication: 'Intermediate proximal LAD lesion on angiography, exertional angina', clinicalQuestion: 'intermediate-lesion' },
  { accession: 'SBR-26-0412', mrn: 'SB-118902', state: 'signed', endedHoursAgo: 30, indication: 'Moderate mid RCA lesion, atypical chest pain', clinicalQuestion: 'intermediate-lesion' },
  { accession: 'SBR-26-0413', mrn: 'SB-120517', state: 'awaiting-signature', endedHoursAgo: 5, indication: 'Angina with no obstructive disease on prior CT angiography', clinicalQuestion: 'angina-no-obstruction' },
  { accession: 'SBR-26-0414', mrn: 'SB-123088', state: 'draft', endedHoursAgo: 2, indication: 'Rest angina at night, no obstructive disease', clinicalQuestion: 'angina-no-obstruction' },
  { accession: 'SBR-26-0415', mrn: 'SB-125640', state: 'amended', endedHoursAgo: 75, indication: 'Exertional chest pain, normal non-invasive tests', clinicalQuestion: 'angina-no-obstruction' },
  { accession: 'SBR-26-0416', mrn: 'SB-127711', state: 'awaiting-signature', endedHoursAgo: 40, indication: 'Angina with no obstructive disease, dyspnoea', clinicalQuestion: 'angina-no-obstruction' },
] as const;
