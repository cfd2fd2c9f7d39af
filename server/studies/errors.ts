/** A vessel or dose row id sent by the client already belongs to another study. */
export class DuplicateRowIdError extends Error {
  constructor() {
    super('A vessel or dose row id belongs to another study. Reload the study.');
    this.name = 'DuplicateRowIdError';
  }
}
