export * from './schema.js';
export * from './projection-schema.js';
export * from './comments-schema.js';
export * from './deid-schema.js';
export * from './supervision-schema.js';
export { bytea, toUint8Array } from './bytea.js';
export { DatabaseError } from './errors.js';
export { openDatabase, migrationsFolder, rowsOf } from './open.js';
export type { Database, Db, DbKind, OpenOptions, Schema } from './open.js';
// Query helpers re-exported so packages that only query (tests, scripts) need not depend on drizzle-orm.
export { sql, eq, and, or, asc, desc, gt, gte, lt, lte, inArray, isNull, isNotNull } from 'drizzle-orm';
// Schema introspection, for checks that must visit every table (deletion, the purge's scan).
export { getTableConfig, PgTable } from 'drizzle-orm/pg-core';
