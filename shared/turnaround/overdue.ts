/**
 * How long a study has waited since the procedure ended, against the lab's target.
 * The default target (sign within 24 h) is common practice; the deadline is hospital policy.
 */
export const defaultSignatureTargetHours = 24;

export interface Waiting {
  hoursWaiting: number;
  overdue: boolean;
}

export function waitingSince(procedureEndedAt: Date, now: Date, targetHours = defaultSignatureTargetHours): Waiting {
  const hoursWaiting = Math.max(0, (now.getTime() - procedureEndedAt.getTime()) / 3_600_000);
  return { hoursWaiting, overdue: hoursWaiting > targetHours };
}
