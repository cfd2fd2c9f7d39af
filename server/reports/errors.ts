import type { FieldIssue } from '../errors';
import { missingSummary, type MissingItem } from '../../shared/report/completeness';
import type { TransitionRefusal } from '../../shared/study/state-machine';

/** The study is not complete enough to sign: every missing item at once, each pointing at its field. */
export class IncompleteStudyError extends Error {
  public readonly issues: FieldIssue[];
  constructor(missing: MissingItem[]) {
    super(missingSummary({ missing }) ?? 'Nothing is missing before the report can be signed.');
    this.name = 'IncompleteStudyError';
    this.issues = missing.map((m) => ({ pointer: `/${m.path}`, detail: m.message }));
  }
}

/** The state machine refused a move (wrong state, a role that may not, a missing reason); the detail says which move. */
export class TransitionRefusedError extends Error {
  constructor(
    public readonly refusal: TransitionRefusal,
    detail: string,
  ) {
    super(detail);
    this.name = 'TransitionRefusedError';
  }
}

/**
 * The physician's sign-in is too old to sign: confirm who they are at the identity provider, then sign.
 * `reauthenticateUrl` starts that confirmation and comes back to `returnTo`.
 */
export class ReauthenticationRequiredError extends Error {
  public readonly reauthenticateUrl: string;
  constructor(minutes: number, returnTo: string) {
    super(`Signing needs a sign-in from the last ${minutes} minutes. Sign in again, then sign.`);
    this.name = 'ReauthenticationRequiredError';
    this.reauthenticateUrl = `/api/auth/sign-in?reauth=1&returnTo=${encodeURIComponent(returnTo)}`;
  }
}
