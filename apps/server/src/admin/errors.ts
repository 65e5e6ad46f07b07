/**
 * Typed failures of the admin operations (shared by the API, the command line, demo seeding and
 * tests). They say what went wrong, not how to answer it: the HTTP edge maps each code to a status
 * (http/errors.ts `adminStatus`), the command line prints the message.
 */
export type AdminErrorCode =
  | 'invalid_input' // a value the operation cannot take (an email that is not one, a short password, an empty transcript)
  | 'not_found' // the study, text, member or link named does not exist
  | 'conflict' // the change contradicts what is stored (an email already taken)
  | 'last_owner' // the change would leave a study without an owner
  | 'link_used' // a single-use link followed a second time
  | 'link_expired'; // a link followed after its time

export class AdminError extends Error {
  constructor(
    readonly code: AdminErrorCode,
    message: string,
    /** Field-level details (where in an imported text). */
    readonly details?: unknown,
  ) {
    super(message);
    this.name = 'AdminError';
  }
}

export const missing = (what: string) => new AdminError('not_found', `${what} not found.`);
