/** Typed failures of the database layer. */
export class DatabaseError extends Error {
  constructor(
    readonly code: 'db_open_failed' | 'db_migrate_failed' | 'db_closed',
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = 'DatabaseError';
  }
}
