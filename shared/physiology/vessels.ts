import type { VesselCode } from './schema';

/**
 * Names of the vessels as people in the lab read and write them: the short names of the trade for
 * screens, reasons and tables, and the long names for headings and the report. The stored codes are
 * internal and never shown.
 */
export const vesselShortName: Readonly<Record<VesselCode, string>> = Object.freeze({
  LM: 'LM',
  LAD: 'LAD',
  LCX: 'LCx',
  RCA: 'RCA',
  RAMUS: 'Ramus',
  DIAGONAL: 'Diagonal',
  OBTUSE_MARGINAL: 'OM',
  PDA: 'PDA',
  PLB: 'PLB',
  GRAFT: 'Graft',
});

export const vesselLongName: Readonly<Record<VesselCode, string>> = Object.freeze({
  LM: 'Left main',
  LAD: 'Left anterior descending',
  LCX: 'Circumflex',
  RCA: 'Right coronary',
  RAMUS: 'Ramus intermedius',
  DIAGONAL: 'Diagonal branch',
  OBTUSE_MARGINAL: 'Obtuse marginal branch',
  PDA: 'Posterior descending',
  PLB: 'Posterolateral branch',
  GRAFT: 'Bypass graft',
});

/** Vessels supplied from the right coronary ostium, where acetylcholine is given in lower doses. */
export const rightCoronaryVessels: ReadonlySet<VesselCode> = new Set<VesselCode>(['RCA', 'PDA', 'PLB']);
