import { AttachmentNotFoundError, NoFileError, UnsupportedFileTypeError } from '../attachments/errors';
import { NotCurrentSetError, ReviewCompletedError, ReviewIncompleteError, SetSupersededError } from '../coding/errors';
import { InvalidCursorError } from '../db/keyset-cursor';
import { DeliveryBusyError } from '../ehr/errors';
import { InvalidRequestError, RecordNotFoundError, ServiceNotAnsweringError, UnacceptableValueError } from '../errors';
import { IncompleteStudyError, ReauthenticationRequiredError, TransitionRefusedError } from '../reports/errors';
import { StaleSettingsError } from '../settings/lab-settings';
import { DuplicateRowIdError } from '../studies/errors';
import { PatientMismatchError, PatientSharedError, StaleVersionError, StudyLockedError } from '../studies/errors';
import type { ProblemSlug } from '../../shared/http/problem';
import type { TransitionRefusal } from '../../shared/study/state-machine';
import { BadRequestError, HttpError, NotFoundError, ServiceUnavailableError, UnprocessableError } from './problem';

const refusalText: Record<TransitionRefusal, [number, ProblemSlug, string]> = {
  'wrong-state': [409, 'wrong-state', 'The study is not in a state that allows this'],
  'not-permitted': [403, 'forbidden', 'Your role may not do this'],
  'reason-required': [422, 'reason-required', 'A reason is required'],
};

/**
 * The one place where the services' plain domain errors become HTTP answers. A service throws what
 * went wrong in its own terms; the problem handler asks here for the status and the problem type.
 */
export function httpErrorOf(error: unknown): HttpError | undefined {
  if (!(error instanceof Error)) return undefined;
  // Shared (server/errors.ts).
  if (error instanceof RecordNotFoundError || error instanceof AttachmentNotFoundError) return new NotFoundError(error.message);
  if (error instanceof InvalidRequestError) return new BadRequestError(error.message, error.issues);
  if (error instanceof UnacceptableValueError) return new UnprocessableError(error.message, error.issues);
  if (error instanceof ServiceNotAnsweringError) return new ServiceUnavailableError(error.message);
  if (error instanceof InvalidCursorError) return new BadRequestError(error.message, [{ pointer: '/cursor', detail: 'Not a cursor this server issued.' }]);
  // Attachments.
  if (error instanceof NoFileError) return new HttpError(400, 'no-file', 'No file', error.message);
  if (error instanceof UnsupportedFileTypeError) return new HttpError(415, 'unsupported-file-type', 'File type not accepted', error.message);
  // Studies.
  if (error instanceof DuplicateRowIdError) return new HttpError(409, 'duplicate-row-id', 'Row id already used', error.message);
  if (error instanceof StaleVersionError) {
    return new HttpError(409, 'stale-version', 'The study has changed since you opened it', error.message, undefined, { currentVersion: error.current.version, current: error.current });
  }
  if (error instanceof PatientMismatchError) return new HttpError(409, 'patient-mismatch', 'The MRN belongs to another patient', error.message, error.issues);
  if (error instanceof PatientSharedError) return new HttpError(409, 'patient-shared', 'The patient has other studies', error.message, error.issues);
  if (error instanceof StudyLockedError) return new HttpError(409, 'study-signed', 'The study is signed', error.message);
  // Reports: the hand-off and signing.
  if (error instanceof TransitionRefusedError) {
    const [status, slug, title] = refusalText[error.refusal];
    return new HttpError(status, slug, title, error.message, error.refusal === 'reason-required' ? [{ pointer: '/reason', detail: 'Say why.' }] : undefined);
  }
  if (error instanceof IncompleteStudyError) return new HttpError(422, 'study-incomplete', 'The study is not complete', error.message, error.issues);
  if (error instanceof ReauthenticationRequiredError) {
    return new HttpError(401, 'reauthentication-required', 'Confirm who you are to sign', error.message, undefined, { reauthenticateUrl: error.reauthenticateUrl });
  }
  // Settings.
  if (error instanceof StaleSettingsError) return new HttpError(409, 'stale-settings', 'The settings have changed since you opened them', error.message, undefined, { current: error.current });
  // Coding review.
  if (error instanceof SetSupersededError) return new HttpError(409, 'suggestions-superseded', 'An addendum changed the suggestions', error.message);
  if (error instanceof NotCurrentSetError) return new HttpError(409, 'not-current-set', "Not this study's current code set", error.message);
  if (error instanceof ReviewCompletedError) return new HttpError(409, 'review-completed', 'The review is complete', error.message);
  if (error instanceof ReviewIncompleteError) {
    return new HttpError(409, 'review-incomplete', 'The review cannot be completed yet', error.message, error.blockers.map((b) => ({ pointer: '', detail: b })));
  }
  // EHR delivery.
  if (error instanceof DeliveryBusyError) return new HttpError(409, 'delivery-in-progress', 'Being sent now', error.message);
  return undefined;
}
