import { problemOfText } from '../http/input-safety';
import { uuidPattern } from '../../shared/uuid';

/**
 * The opaque cursor of keyset pages ordered by `(timestamp, id)` descending (the audit trail, the
 * worklist): the last row's timestamp as PostgreSQL prints it (text, so microseconds survive) and
 * its id, as base64url JSON. Decoding accepts only what encoding makes: a cursor that is not one, or
 * that names an impossible instant (30 February, hour 99), is refused before it reaches the database.
 */
export interface KeysetCursor {
  at: string;
  id: string;
}

/** A cursor this server did not issue. */
export class InvalidCursorError extends Error {
  constructor() {
    super('The page cursor is not valid: start again from the first page.');
    this.name = 'InvalidCursorError';
  }
}

/** Ids of `bigint` keys (the audit trail). */
export const bigintIdPattern = /^[1-9]\d{0,17}$/;
/** Ids of `uuid` keys (studies): the product's UUID form, lower case only, as PostgreSQL prints them and a cursor carries them. */
export const uuidIdPattern = new RegExp(uuidPattern.source);

const timestampPattern = /^\d{4}-\d{2}-\d{2} \d{2}:\d{2}:\d{2}(\.\d{1,6})?[+-]\d{2}(:?\d{2})?$/;

export function encodeKeysetCursor(at: string, id: string): string {
  return Buffer.from(JSON.stringify([at, id])).toString('base64url');
}

export function decodeKeysetCursor(cursor: string, idPattern: RegExp): KeysetCursor {
  try {
    const value = JSON.parse(Buffer.from(cursor, 'base64url').toString('utf8'));
    if (
      Array.isArray(value) &&
      value.length === 2 &&
      typeof value[0] === 'string' &&
      timestampPattern.test(value[0]) &&
      // Well formed is not enough: 30 February or hour 99 would reach the database as a data error.
      problemOfText(value[0].replace(/([+-]\d{2})$/, '$1:00')) === null &&
      typeof value[1] === 'string' &&
      idPattern.test(value[1])
    ) {
      return { at: value[0], id: value[1] };
    }
  } catch {
    /* fall through */
  }
  throw new InvalidCursorError();
}
