/**
 * A test's own scan for original words, independent of the server's (apps/server/src/deid/scan.ts):
 * every table of the schema but the pseudonym key, every text, jsonb and bytea column, all rows
 * (not only the study's), counted per table.column. Yjs stores strings as UTF-8, so bytes are searched.
 */
import { rowsOf, sql, type Db } from '@gloss/db';
import { allTables } from './schema-scan.js';

export async function scanForOriginals(db: Db, originals: readonly string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const table of allTables()) {
    if (table.name === 'pseudonyms') continue;
    const cols = table.columns.filter((c) => ['text', 'jsonb', 'bytea'].includes(c.type));
    for (const original of originals) {
      for (const c of cols) {
        const cond = c.type === 'bytea' ? sql`position(convert_to(${original}, 'UTF8') in ${sql.identifier(c.name)}) > 0` : sql`strpos(${sql.identifier(c.name)}::text, ${original}) > 0`;
        const [row] = rowsOf<{ n: string | number }>(await db.execute(sql`select count(*) as n from ${sql.identifier(table.name)} where ${cond}`));
        if (Number(row?.n ?? 0) > 0) out[`${table.name}.${c.name}`] = (out[`${table.name}.${c.name}`] ?? 0) + Number(row!.n);
      }
    }
  }
  return out;
}
