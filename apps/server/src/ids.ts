/** Ids in Gloss are uuids (PostgreSQL `uuid`). */
const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

/** Ids arrive from URLs and messages; anything not a uuid cannot name a row (and would make PostgreSQL raise 22P02). */
export function isUuid(value: string): boolean {
  return UUID.test(value);
}
