import { AttachmentNotFoundError, NoFileError, UnsupportedFileTypeError } from '../attachments/errors';
import { InvalidCursorError } from '../db/keyset-cursor';
import { DuplicateRowIdError, RecordNotFoundError } from '../studies/errors';
import { BadRequestError, HttpError, NotFoundError } from './problem';

/**
 * The one place where the services' plain domain errors become HTTP answers. A service throws what
 * went wrong in its own terms; the problem handler asks here for the status and the problem type.
 */
export function httpErrorOf(error: unknown): HttpError | undefined {
  if (error instanceof NoFileError) return new HttpError(400, 'no-file', 'No file', error.message);
  if (error instanceof UnsupportedFileTypeError) return new HttpError(415, 'unsupported-file-type', 'File type not accepted', error.message);
  if (error instanceof AttachmentNotFoundError || error instanceof RecordNotFoundError) return new NotFoundError(error.message);
  if (error instanceof DuplicateRowIdError) return new HttpError(409, 'duplicate-row-id', 'Row id already used', error.message);
  if (error instanceof InvalidCursorError) return new BadRequestError(error.message, [{ pointer: '/cursor', detail: 'Not a cursor this server issued.' }]);
  return undefined;
}
