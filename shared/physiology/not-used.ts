/**
 * CFR, IMR, RRR and MRR draw no microvascular finding in a vessel where obstruction is not excluded
 * (COVADIS; EAPCI 2020): the one wording of why, as the analysis's reasons and the report print it.
 */
export type NotUsedCause = 'obstructive' | 'not-excluded';

const notUsed = 'not used for the microvascular finding';

const cause: Record<NotUsedCause, { clause: string; sentence: string }> = {
  obstructive: { clause: 'in a vessel with an obstructive stenosis', sentence: 'the vessel has an obstructive stenosis' },
  'not-excluded': { clause: 'obstruction was not excluded in this vessel', sentence: 'obstruction was not excluded in this vessel' },
};

/** A qualifier closing an index's reason (no final stop): " — in a vessel with an obstructive stenosis, so not used for …". */
export const notUsedClause = (why: NotUsedCause): string => ` — ${cause[why].clause}, so ${notUsed}`;

/** A sentence following an index's report sentence: " Not used for the microvascular finding: the vessel has …." */
export const notUsedSentence = (why: NotUsedCause): string => ` ${notUsed[0].toUpperCase()}${notUsed.slice(1)}: ${cause[why].sentence}.`;
