/** A job that cannot run because what it refers to is gone, incomplete or too large; retrying would not help. */
export class JobInputError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'JobInputError';
  }
}
