import { HttpError, type FieldProblem } from '../http/problem';
import type { MissingItem } from '../../shared/report/completeness';
import type { TransitionRefusal } from '../../shared/study/state-machine';

/** The study is not complete enough to sign: every missing item at once, each pointing at its field. */
export class IncompleteStudyError extends HttpError {
  constructor(missing: MissingItem[]) {
    super(
      422,
      'study-incomplete',
      'The study is not complete',
      `${missing.length} item${missing.length === 1 ? ' is' : 's are'} missing before the report can be signed.`,
      missing.map((m): FieldProblem => ({ pointer: `/${m.path}`, detail: m.message })),
    );
  }
}

const refusalText: Record<TransitionRefusal, [number, string, string]> = {
  'wrong-state': [409, 'wrong-state', 'The study is not in a state that allows this'],
  'not-permitted': [403, 'forbidden', 'Your role may not do this'],
  'reason-required': [422, 'reason-required', 'A reason is required'],
};

export class TransitionRefusedError extends HttpError {
  constructor(refusal: TransitionRefusal, detail: string) {
    const [status, slug, title] = refusalText[refusal];
    super(status, slug, title, detail, refusal === 'reason-required' ? [{ pointer: '/reason', detail: 'Say why.' }] : undefined);
  }
}

/**
 * The physician's sign-in is too old to sign: confirm who they are at the identity provider, then sign.
 * `reauthenticateUrl` starts that confirmation and comes back to `returnTo`.
 */
export class ReauthenticationRequiredError extends HttpError {
  constructor(minutes: number, returnTo: string) {
    super(401, 'reauthentication-required', 'Confirm who you are to sign', `Signing needs a sign-in from the last ${minutes} minutes. Sign in again, then sign.`, undefined, {
      reauthenticateUrl: `/api/auth/sign-in?reauth=1&returnTo=${encodeURIComponent(returnTo)}`,
    });
  }
}
