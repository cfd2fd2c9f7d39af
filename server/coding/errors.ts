/** A coder acted on an older code set of this study: an addendum's set is in force now. */
export class SetSupersededError extends Error {
  constructor(versionNo: number) {
    super(`The report has been amended (version ${versionNo}) and the codes were suggested again. Reload the review.`);
    this.name = 'SetSupersededError';
  }
}

/** A code set id that is not one of this study's sets. */
export class NotCurrentSetError extends Error {
  constructor() {
    super("This is not this study's current code set. Reload the review.");
    this.name = 'NotCurrentSetError';
  }
}

/** The review is complete: its codes change only when an addendum puts the study back on the queue. */
export class ReviewCompletedError extends Error {
  constructor() {
    super('This study has been coded; its codes change only when an addendum puts it back on the queue.');
    this.name = 'ReviewCompletedError';
  }
}

/** A review completed while a blocking warning stands or a suggested code is undecided. */
export class ReviewIncompleteError extends Error {
  constructor(public readonly blockers: string[]) {
    super(blockers.join(' '));
    this.name = 'ReviewIncompleteError';
  }
}
