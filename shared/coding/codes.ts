import type { CodeSystem } from './schema';

/** Shown with every suggestion and every result. */
export const CODING_CAUTION =
  'Suggestion — verify against current code-set rules and payer policy. These codes are decision support for a certified coder, not a claim.';

/**
 * The codes the engine can suggest, each with a description in our own words (the code sets'
 * descriptors are copyrighted), whether it is an add-on, whether it splits into professional and
 * technical components (so modifier 26 applies to the physician's claim in a hospital), and the
 * first code-set release that holds it.
 */
export interface CodeEntry {
  system: CodeSystem;
  code: string;
  description: string;
  addOn: boolean;
  /** Has a professional/technical split: the physician's hospital claim carries modifier 26. */
  professionalComponent: boolean;
  /** First release holding the code (CPT/HCPCS calendar year, ICD-10 fiscal year). */
  since: number;
  /** Where the code and its description come from. */
  source: string;
}

const CPT_CATH = 'CPT code set, diagnostic cardiac catheterization family 93451–93461 (in use since CPT 2011) [memory, well known]';
const CPT_PCI = 'CPT code set, percutaneous coronary intervention family 92920–92944 (in use since CPT 2013); hierarchy summarised in AHIMA Code Write, February 2013';
const CPT_PHYS = 'CPT code set, 93571/93572 descriptor: flow reserve or pressure-derived measurement by wire during coronary angiography, pharmacologic stress included, initial / each additional vessel';
const HCPCS_DES = 'CMS HCPCS Level II, hospital outpatient drug-eluting stent codes C9600–C9608 [memory]';
const ICD_CM = 'CMS ICD-10-CM tabular list, category I20 and I25 (FY2024 additions effective 1 October 2023)';
const ICD_PCS = 'CMS ICD-10-PCS table 4A0 (measurement, physiological systems) [memory — check against the PCS tables]';

const cpt = (code: string, description: string, o: Partial<CodeEntry> & { source: string }): CodeEntry => ({
  system: 'CPT',
  code,
  description,
  addOn: false,
  professionalComponent: false,
  since: 2013,
  ...o,
});

export const codeTable: readonly CodeEntry[] = Object.freeze([
  // Diagnostic catheterization without coronary angiography (primary codes, not primaries for 93571).
  cpt('93451', 'Right heart catheterization with pressures and oxygen saturations, no coronary angiography', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93452', 'Left heart catheterization (left ventriculography when done), no coronary angiography', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93453', 'Right and left heart catheterization (left ventriculography when done), no coronary angiography', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  // Diagnostic catheterization with coronary angiography.
  cpt('93454', 'Selective coronary angiography, no heart catheterization', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93455', 'Coronary angiography with bypass graft angiography', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93456', 'Coronary angiography with right heart catheterization', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93457', 'Coronary angiography with bypass graft angiography and right heart catheterization', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93458', 'Coronary angiography with left heart catheterization (left ventriculography when done)', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93459', 'Coronary angiography with left heart catheterization and bypass graft angiography', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93460', 'Coronary angiography with right and left heart catheterization', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  cpt('93461', 'Coronary angiography with right and left heart catheterization and bypass graft angiography', { professionalComponent: true, since: 2011, source: CPT_CATH }),
  // Coronary interventions, native vessels.
  cpt('92920', 'Balloon angioplasty of one major coronary artery or branch', { source: CPT_PCI }),
  cpt('92921', 'Balloon angioplasty, each additional branch of a major coronary artery', { addOn: true, source: CPT_PCI }),
  cpt('92924', 'Atherectomy with any angioplasty of one major coronary artery or branch', { source: CPT_PCI }),
  cpt('92925', 'Atherectomy with any angioplasty, each additional branch', { addOn: true, source: CPT_PCI }),
  cpt('92928', 'Stent placement with any angioplasty of one major coronary artery or branch', { source: CPT_PCI }),
  cpt('92929', 'Stent placement with any angioplasty, each additional branch', { addOn: true, source: CPT_PCI }),
  cpt('92933', 'Atherectomy and stent placement with any angioplasty of one major coronary artery or branch', { source: CPT_PCI }),
  cpt('92934', 'Atherectomy and stent placement with any angioplasty, each additional branch', { addOn: true, source: CPT_PCI }),
  // Coronary interventions through a bypass graft.
  cpt('92937', 'Any combination of stent, atherectomy and angioplasty through one coronary bypass graft', { source: CPT_PCI }),
  cpt('92938', 'Any combination of stent, atherectomy and angioplasty, each additional branch served by the bypass graft', { addOn: true, source: CPT_PCI }),
  // Coronary physiology by wire.
  cpt('93571', 'Coronary flow reserve or pressure-derived measurement by wire, hyperaemic drug included: first vessel', { addOn: true, professionalComponent: true, since: 2001, source: CPT_PHYS }),
  cpt('93572', 'Coronary flow reserve or pressure-derived measurement by wire, hyperaemic drug included: each additional vessel', { addOn: true, professionalComponent: true, since: 2001, source: CPT_PHYS }),
  // HCPCS Level II, hospital outpatient drug-eluting stents.
  { system: 'HCPCS', code: 'C9600', description: 'Drug-eluting stent with any angioplasty, one major coronary artery or branch (hospital outpatient)', addOn: false, professionalComponent: false, since: 2016, source: HCPCS_DES },
  { system: 'HCPCS', code: 'C9601', description: 'Drug-eluting stent with any angioplasty, each additional branch (hospital outpatient)', addOn: true, professionalComponent: false, since: 2016, source: HCPCS_DES },
  { system: 'HCPCS', code: 'C9602', description: 'Drug-eluting stent with atherectomy and any angioplasty, one major coronary artery or branch (hospital outpatient)', addOn: false, professionalComponent: false, since: 2016, source: HCPCS_DES },
  { system: 'HCPCS', code: 'C9603', description: 'Drug-eluting stent with atherectomy and any angioplasty, each additional branch (hospital outpatient)', addOn: true, professionalComponent: false, since: 2016, source: HCPCS_DES },
  { system: 'HCPCS', code: 'C9604', description: 'Drug-eluting stent with any atherectomy and angioplasty through one coronary bypass graft (hospital outpatient)', addOn: false, professionalComponent: false, since: 2016, source: HCPCS_DES },
  { system: 'HCPCS', code: 'C9605', description: 'Drug-eluting stent through a bypass graft, each additional branch served by the graft (hospital outpatient)', addOn: true, professionalComponent: false, since: 2016, source: HCPCS_DES },
  // ICD-10-PCS, inpatient facility.
  { system: 'ICD-10-PCS', code: '4A033BC', description: 'Measurement of coronary arterial pressure, percutaneous', addOn: false, professionalComponent: false, since: 2016, source: ICD_PCS },
  { system: 'ICD-10-PCS', code: '4A0335C', description: 'Measurement of coronary arterial flow, percutaneous', addOn: false, professionalComponent: false, since: 2016, source: ICD_PCS },
  // ICD-10-CM diagnoses.
  ...(
    [
      ['I25.10', 'Atherosclerotic heart disease of a native coronary artery, no angina', 2016],
      ['I25.110', 'Atherosclerotic heart disease of a native coronary artery with unstable angina', 2016],
      ['I25.111', 'Atherosclerotic heart disease of a native coronary artery with angina and documented spasm', 2016],
      ['I25.118', 'Atherosclerotic heart disease of a native coronary artery with another form of angina', 2016],
      ['I25.119', 'Atherosclerotic heart disease of a native coronary artery with angina, type not specified', 2016],
      ['I20.1', 'Angina with documented coronary spasm', 2016],
      ['I20.81', 'Angina with coronary microvascular dysfunction', 2024],
      ['I20.9', 'Angina, type not specified', 2016],
      ['I25.85', 'Chronic coronary microvascular dysfunction', 2024],
      ['R07.9', 'Chest pain, not specified', 2016],
    ] as const
  ).map(([code, description, since]): CodeEntry => ({
    system: 'ICD-10-CM',
    code,
    description,
    addOn: false,
    professionalComponent: false,
    since,
    source: since === 2024 ? `${ICD_CM}; new in FY2024` : code === 'R07.9' ? 'CMS ICD-10-CM tabular list, R07 [memory]' : ICD_CM,
  })),
]);

const byKey = new Map(codeTable.map((c) => [`${c.system}|${c.code}`, c]));

/** The table entry of a code the engine knows, or undefined. */
export function codeEntry(system: CodeSystem, code: string): CodeEntry | undefined {
  return byKey.get(`${system}|${code}`);
}

/** Primary codes with which 93571/93572 may be reported, as the code set's parenthetical lists them [list partly from memory]. */
export const physiologyPrimaryCodes: ReadonlySet<string> = new Set([
  '92920', '92924', '92928', '92933', '92937', '92941', '92943', '92975',
  '93454', '93455', '93456', '93457', '93458', '93459', '93460', '93461', '93563', '93564',
  // Hospital outpatient stent codes stand in for 92928/92933/92937 on a facility claim [memory].
  'C9600', 'C9602', 'C9604',
]);

/** Primary codes for the branch add-ons (each additional branch of a major coronary artery or graft). */
export const pciAddOnPrimaries: Readonly<Record<string, readonly string[]>> = Object.freeze({
  '92921': ['92920', '92924', '92928', '92933', '92937', '92941', '92943', 'C9600', 'C9602', 'C9604'],
  '92925': ['92924', '92933', '92937', '92941', '92943', 'C9602', 'C9604'],
  '92929': ['92928', '92933', '92937', '92941', '92943', 'C9600', 'C9602', 'C9604'],
  '92934': ['92933', '92937', '92941', '92943', 'C9602', 'C9604'],
  '92938': ['92937', 'C9604'],
  C9601: ['C9600', 'C9602', 'C9604', '92928', '92933', '92937'],
  C9603: ['C9602', 'C9604', '92933', '92937'],
  C9605: ['C9604', '92937'],
});
