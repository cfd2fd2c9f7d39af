import type { RequestHandler } from 'express';
import { BadRequestError, pointerOf, UnprocessableError, type FieldProblem } from './problem';

/**
 * Values no schema should have to think about, refused for every route before it runs:
 * - text with a NUL character (PostgreSQL text and jsonb cannot hold U+0000);
 * - text with an unpaired UTF-16 surrogate (not Unicode text; jsonb refuses its escape);
 * - a date or a date and time that cannot exist: year 0000, 30 February, an offset outside
 *   −12:00 … +14:00 (the range of every zone in the IANA time zone database).
 * Looked for in the JSON body (keys and values) and in the query string; each problem is named by
 * a JSON pointer (a query parameter as `/name`).
 */
export const refuseImpossibleValues: RequestHandler = (req, _res, next) => {
  const malformed = malformedQueryParameters(req.originalUrl);
  if (malformed.length) {
    return next(new BadRequestError('The address has a malformed percent-escape (not UTF-8).', malformed.map((name) => ({ pointer: pointerOf([name]), detail: 'Not valid percent-encoded UTF-8.' }))));
  }
  const problems = [...findProblems(req.query, []), ...(req.body !== undefined ? findProblems(req.body, []) : [])];
  if (problems.length === 0) return next();
  next(new UnprocessableError(`The request has ${problems.length === 1 ? 'a value' : `${problems.length} values`} that cannot be accepted.`, problems.slice(0, 20)));
};

const maxProblems = 20;

type Step = { key: PropertyKey; parent: Step | null };
const pathOf = (step: Step | null, root: PropertyKey[]): PropertyKey[] => {
  const keys: PropertyKey[] = [];
  for (let s = step; s; s = s.parent) keys.push(s.key);
  return [...root, ...keys.reverse()];
};

/** Walks any JSON value without recursion (a deeply nested body must not exhaust the stack). */
export function findProblems(root: unknown, rootPath: PropertyKey[]): FieldProblem[] {
  const problems: FieldProblem[] = [];
  const stack: Array<[unknown, Step | null]> = [[root, null]];
  while (stack.length && problems.length < maxProblems) {
    const [value, at] = stack.pop()!;
    if (typeof value === 'string') {
      const detail = problemOfText(value);
      if (detail) problems.push({ pointer: pointerOf(pathOf(at, rootPath)), detail });
    } else if (Array.isArray(value)) {
      for (let i = value.length - 1; i >= 0; i--) stack.push([value[i], { key: i, parent: at }]);
    } else if (value && typeof value === 'object') {
      for (const [key, child] of Object.entries(value)) {
        const keyProblem = problemOfText(key, false);
        if (keyProblem) problems.push({ pointer: pointerOf(pathOf({ key, parent: at }, rootPath)), detail: `The field name: ${keyProblem}` });
        else stack.push([child, { key, parent: at }]);
      }
    }
  }
  return problems;
}

const isoDate = /^(\d{4})-(\d{2})-(\d{2})$/;
const isoDateTime = /^(\d{4})-(\d{2})-(\d{2})[Tt ](\d{2}):(\d{2})(?::(\d{2})(?:[.,]\d+)?)?(?:[Zz]|([+-])(\d{2}):?(\d{2}))?$/;
/** UTC−12:00 (Etc/GMT+12) and UTC+14:00 (Pacific/Kiritimati) bound the IANA zones. */
const maxOffsetMinutes = { '+': 14 * 60, '-': 12 * 60 } as const;
const loneSurrogate = /[\uD800-\uDBFF](?![\uDC00-\uDFFF])|(?<![\uD800-\uDBFF])[\uDC00-\uDFFF]/;

/** Why a piece of text cannot be accepted, or null. */
export function problemOfText(text: string, checkDates = true): string | null {
  if (text.includes('\u0000')) return 'Text may not contain the NUL character.';
  if (loneSurrogate.test(text)) return 'Text contains an unpaired surrogate: it is not valid Unicode.';
  // No length bound: a long fraction of a second must not carry a bad year or offset past the check.
  if (!checkDates || !/^\d{4}-/.test(text)) return null;
  const date = isoDate.exec(text);
  // A date alone: its calendar is the schema's to judge (so every field error comes back together);
  // only the year PostgreSQL cannot store is refused here.
  if (date) return +date[1] < 1 ? 'Not a real date: the year must be 0001 or later.' : null;
  const dt = isoDateTime.exec(text);
  if (!dt) return null;
  const dayProblem = problemOfDate(+dt[1], +dt[2], +dt[3]);
  if (dayProblem) return dayProblem;
  if (+dt[4] > 23 || +dt[5] > 59 || (dt[6] !== undefined && +dt[6] > 59)) return 'Not a real time of day.';
  if (dt[7] && (+dt[9] > 59 || +dt[8] * 60 + +dt[9] > maxOffsetMinutes[dt[7] as '+' | '-'])) return 'The offset from UTC must lie between −12:00 and +14:00.';
  return null;
}

function problemOfDate(year: number, month: number, day: number): string | null {
  if (year < 1) return 'Not a real date: the year must be 0001 or later.';
  if (month < 1 || month > 12) return 'Not a real date: the month must be 01–12.';
  const daysInMonth = new Date(Date.UTC(2000, month, 0)).getUTCDate() - (month === 2 && !isLeap(year) ? 1 : 0);
  if (day < 1 || day > daysInMonth) return `Not a real date: that month has ${daysInMonth} days.`;
  return null;
}

const isLeap = (y: number) => (y % 4 === 0 && y % 100 !== 0) || y % 400 === 0;

/** Query parameters whose name or value is not valid percent-encoded UTF-8 (RFC 3986 §2.1, RFC 3629). */
function malformedQueryParameters(url: string): string[] {
  const q = url.indexOf('?');
  if (q < 0 || !url.includes('%', q)) return [];
  const bad: string[] = [];
  for (const pair of url.slice(q + 1).split('&')) {
    const [rawName, rawValue = ''] = pair.split('=', 2);
    const name = safeDecode(rawName);
    if (name === null) bad.push(rawName.replace(/%/g, '%25'));
    else if (safeDecode(rawValue) === null) bad.push(name);
  }
  return bad;
}

/** Decodes a percent-encoded component, or null when it is malformed or not UTF-8. */
export function safeDecode(raw: string): string | null {
  try {
    return decodeURIComponent(raw.replace(/\+/g, ' '));
  } catch {
    return null;
  }
}
