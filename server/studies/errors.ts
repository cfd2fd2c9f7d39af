/** A vessel or dose row id sent by the client already belongs to another study. */
export class DuplicateRowIdError extends Error {
  constructor() {
    super('A vessel or dose row id belongs to another study. Reload the study.');
    this.name = 'DuplicateRowIdError';
  }
}

/** Nothing by this id (a study, a report version): the detail names what was looked for. */
export class RecordNotFoundError extends Error {
  constructor(detail: string) {
    super(detail);
    this.name = 'RecordNotFoundError';
  }
}
