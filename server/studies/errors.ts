import type { StudyRecord } from '../../shared/study/schema';
import type { FieldIssue } from '../errors';

/** A vessel or dose row id sent by the client already belongs to another study. */
export class DuplicateRowIdError extends Error {
  constructor() {
    super('A vessel or dose row id belongs to another study. Reload the study.');
    this.name = 'DuplicateRowIdError';
  }
}

/** A write based on an older version than the stored one. Carries the current record for a merge. */
export class StaleVersionError extends Error {
  constructor(public readonly current: StudyRecord) {
    super(`Someone saved version ${current.version} while you were editing. Reload it, or merge your changes into it.`);
    this.name = 'StaleVersionError';
  }
}

/** The MRN belongs to someone else: the study is not moved to them, and nobody is renamed. */
export class PatientMismatchError extends Error {
  public readonly issues: FieldIssue[] = [{ pointer: '/patient/mrn', detail: 'This MRN is on file for another patient. Check the MRN.' }];
  /**
   * Says only that the MRN belongs to someone else: naming what differs (the birth date, the given
   * name) would let anyone with write access probe another patient's demographics one field at a time.
   */
  constructor(
    public readonly mrn: string,
    public readonly fields: string[],
  ) {
    super('This MRN is on file for another patient. Check the MRN and the name.');
    this.name = 'PatientMismatchError';
  }
}

/** The patient's demographics are shared by all their studies: a study may not rewrite them. */
export class PatientSharedError extends Error {
  public readonly issues: FieldIssue[];
  constructor(fields: string[]) {
    super('This patient has other studies; correct the name, birth date or sex in the hospital record.');
    this.name = 'PatientSharedError';
    this.issues = fields.map((f) => ({ pointer: `/patient/${f}`, detail: `This patient has other studies: their ${label(f)} cannot be changed from one study.` }));
  }
}

/** A demographic field's name as a sentence says it. */
function label(field: string): string {
  return ({ familyName: 'family name', givenName: 'given name', birthDate: 'birth date', sex: 'sex' } as Record<string, string>)[field] ?? field;
}

/** A signed (or amended) study is changed only through an addendum. */
export class StudyLockedError extends Error {
  constructor(state: string) {
    super(`A ${state} study cannot be edited; changes to it are made as an addendum.`);
    this.name = 'StudyLockedError';
  }
}
