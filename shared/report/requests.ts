import { z } from 'zod';
import { stateChanges } from '../study/state-machine';
import { thresholdsChoices } from './thresholds-basis';

/**
 * What the client sends to move a study along, sign it and verify a signed report: the server parses
 * with these schemas, the client builds its bodies with their types.
 */

const reasonSchema = z.string({ error: 'reason must be text.' }).trim().max(1000, { error: 'The reason is too long (at most 1000 characters).' }).nullable().optional();
const versionSchema = z.number({ error: 'version is required: the study version you previewed.' }).int().min(1);
const thresholdsChoiceSchema = z.enum(thresholdsChoices, { error: 'thresholds must be "original" (keep the amended version\'s) or "current" (those in force now).' });

/** POST /api/studies/:id/sign: the previewed version, the addendum's reason, and (for an addendum) which thresholds judge it. */
export const signBodySchema = z.strictObject({ version: versionSchema, reason: reasonSchema, thresholds: thresholdsChoiceSchema.optional() });
export type SignBody = z.infer<typeof signBodySchema>;

/** GET /api/studies/:id/report: which thresholds the preview of an addendum uses. */
export const previewQuerySchema = z.object({ thresholds: thresholdsChoiceSchema.optional() });
export type PreviewQuery = z.infer<typeof previewQuerySchema>;

/** POST /api/studies/:id/transitions: a state change of the version previewed, with its reason where one is needed. */
export const transitionBodySchema = z.strictObject({
  action: z.enum(stateChanges, { error: `action must be ${stateChanges.slice(0, -1).join(', ')} or ${stateChanges.at(-1)}.` }),
  version: versionSchema,
  reason: reasonSchema,
});
export type TransitionBody = z.infer<typeof transitionBodySchema>;

/** POST /api/reports/verify as JSON (a PDF is sent as its bytes instead): the fingerprint printed on a report. */
export const verifyBodySchema = z.strictObject({ fingerprint: z.string({ error: 'fingerprint must be text.' }).max(200) });
export type VerifyBody = z.infer<typeof verifyBodySchema>;
