import type { CodingInput, CodingResult } from '../../../shared/coding';

/** A professional claim for hospital outpatient work with nothing done yet; tests add what they need. */
export function input(over: Partial<CodingInput> = {}): CodingInput {
  return {
    billing: 'professional',
    setting: 'hospital',
    patientClass: 'outpatient',
    cath: null,
    pci: [],
    physiology: [],
    vasoreactivity: null,
    diagnoses: { obstructiveCad: false, angina: false, microvascularDysfunction: false, vasospasm: null },
    ...over,
  };
}

export const angiography = (o: Partial<NonNullable<CodingInput['cath']>> = {}): NonNullable<CodingInput['cath']> => ({
  coronaryAngiography: true,
  leftHeart: false,
  rightHeart: false,
  graftAngiography: false,
  ...o,
});

/** Code lines as "SYSTEM code xunits [modifiers]" strings, in result order. */
export const lines = (r: CodingResult, system?: string) =>
  r.codes.filter((c) => !system || c.system === system).map((c) => `${c.code} x${c.units}${c.modifiers.length ? ` ${c.modifiers.join(',')}` : ''}`);

export const warningCodes = (r: CodingResult) => r.warnings.map((w) => w.code);
