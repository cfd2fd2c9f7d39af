/** The upload carried no file, or an empty one. */
export class NoFileError extends Error {
  constructor() {
    super('Choose a file to attach.');
    this.name = 'NoFileError';
  }
}

/** The content is not one of the accepted kinds, or the name claims another kind than the content. */
export class UnsupportedFileTypeError extends Error {
  constructor(detail: string) {
    super(detail);
    this.name = 'UnsupportedFileTypeError';
  }
}

export class AttachmentNotFoundError extends Error {
  constructor() {
    super('No attachment has this id.');
    this.name = 'AttachmentNotFoundError';
  }
}
