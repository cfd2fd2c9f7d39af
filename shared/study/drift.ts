import { driftOutOfRange, type Thresholds, type VesselCode } from '../physiology';
import type { VesselAssessment } from './schema';

export interface DriftSummary {
  /** Vessels with no drift check and no reason why it was not done. */
  missing: VesselCode[];
  /** Vessels whose drift check is outside the window (judged at its displayed precision). */
  outside: VesselCode[];
  /** Vessels whose drift check was not done, with a reason given. */
  notDone: VesselCode[];
  /** Whether there is anything to judge yet: nothing is said before a vessel exists. */
  judged: boolean;
}

/** The drift state of a study's vessels: one rule, used by the header chip, the setup banner and the report. */
export function summariseDrift(vessels: readonly Pick<VesselAssessment, 'vessel' | 'driftPdPa' | 'driftNotDoneReason'>[], t: Pick<Thresholds, 'driftLow' | 'driftHigh'>): DriftSummary {
  const out: DriftSummary = { missing: [], outside: [], notDone: [], judged: vessels.length > 0 };
  for (const v of vessels) {
    const value = v.driftPdPa;
    if (typeof value === 'number' && Number.isFinite(value)) {
      if (driftOutOfRange(value, t)) out.outside.push(v.vessel);
    } else if (v.driftNotDoneReason && v.driftNotDoneReason.trim() !== '') out.notDone.push(v.vessel);
    else out.missing.push(v.vessel);
  }
  return out;
}
