import { vesselShortName } from '../physiology/vessels';
import type { VesselCode } from './schema';

/**
 * Coronary anatomy as the intervention codes count it: five major coronary arteries (left main,
 * LAD, circumflex, right, ramus intermedius); branches are reported under their major artery, and
 * the left main and ramus have no branches of their own for reporting. Bypass grafts are their own
 * family. [CPT coronary intervention guidelines, as summarised in coding articles]
 */
export type MajorArtery = 'LM' | 'LAD' | 'LCX' | 'RCA' | 'RAMUS';

/** The HCPCS coronary artery modifier of each major artery [memory]. */
export const arteryModifier: Readonly<Record<MajorArtery, string>> = Object.freeze({ LM: 'LM', LAD: 'LD', LCX: 'LC', RCA: 'RC', RAMUS: 'RI' });

/**
 * Where a vessel code sits: a major artery, a branch of one, or a bypass graft. The posterior
 * descending and posterolateral branches are taken from the right coronary (right dominance, the
 * common anatomy); in a left-dominant system they come from the circumflex.
 */
export function anatomyOf(vessel: VesselCode): { kind: 'major'; artery: MajorArtery } | { kind: 'branch'; artery: MajorArtery } | { kind: 'graft' } {
  switch (vessel) {
    case 'LM':
    case 'LAD':
    case 'LCX':
    case 'RCA':
    case 'RAMUS':
      return { kind: 'major', artery: vessel };
    case 'DIAGONAL':
      return { kind: 'branch', artery: 'LAD' };
    case 'OBTUSE_MARGINAL':
      return { kind: 'branch', artery: 'LCX' };
    case 'PDA':
    case 'PLB':
      return { kind: 'branch', artery: 'RCA' };
    case 'GRAFT':
      return { kind: 'graft' };
  }
}

export const shortName = (v: VesselCode) => vesselShortName[v];

/** "LAD", "LAD and LCx", "LAD, LCx and RCA". */
export function listNames(names: readonly string[]): string {
  if (names.length <= 1) return names.join('');
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}
