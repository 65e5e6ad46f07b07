export * from './schema.js';
export { bytea, toUint8Array } from './bytea.js';
export { DatabaseError } from './errors.js';
export { openDatabase, migrationsFolder, rowsOf } from './open.js';
export type { Database, Db, DbKind, OpenOptions, Schema } from './open.js';
