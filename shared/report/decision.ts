import type { StudySections } from '../study/schema';
import { decisionLabel } from '../study/vocabulary';
import { hasPressureIndex } from './completeness';

type VesselRow = StudySections['vessels'][number];

/**
 * Whether a vessel row is a lesion the decision is about: a vessel with no visible stenosis (0 %) and
 * no pressure index was assessed for coronary function only.
 */
export function isLesion(v: VesselRow): boolean {
  return hasPressureIndex(v) || v.visualStenosisPct !== 0;
}

/**
 * The decision as the report says it: "defer" is said of a lesion; for a vessel without one the same
 * choice reads "no revascularisation indicated". Null when the record holds no decision.
 */
export function decisionText(v: VesselRow): string | null {
  if (!v.decision) return null;
  if (v.decision === 'defer' && !isLesion(v)) return 'No revascularisation indicated';
  return decisionLabel[v.decision];
}
