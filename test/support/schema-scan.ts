/**
 * Table-by-table checks driven by the drizzle schema itself: every table exported by @gloss/db is
 * visited, so a table added later is checked without anyone remembering to add it here.
 */
import * as schema from '@gloss/db';
import { getTableConfig, PgTable, sql, type Db } from '@gloss/db';

export interface TableInfo {
  name: string;
  /** Columns that can hold an id or words: uuid, text, jsonb, bytea. */
  columns: { name: string; type: string }[];
}

export function allTables(): TableInfo[] {
  const seen = new Set<string>();
  const out: TableInfo[] = [];
  for (const value of Object.values(schema)) {
    if (!(value instanceof PgTable)) continue;
    const config = getTableConfig(value);
    if (seen.has(config.name)) continue;
    seen.add(config.name);
    out.push({ name: config.name, columns: config.columns.map((c) => ({ name: c.name, type: c.getSQLType() })) });
  }
  return out;
}

const rowsOf = <T>(result: unknown): T[] => (Array.isArray(result) ? result : ((result as { rows: T[] }).rows ?? [])) as T[];

/** Rows of each table in which some uuid or text column holds one of `ids`: {table: count}. */
export async function rowsMentioning(db: Db, ids: readonly string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  const list = sql.join(ids.map((id) => sql`${id}`), sql`, `);
  for (const table of allTables()) {
    const cols = table.columns.filter((c) => c.type === 'uuid' || c.type === 'text');
    if (cols.length === 0) continue;
    const where = sql.join(cols.map((c) => sql`${sql.identifier(c.name)}::text in (${list})`), sql` or `);
    const [row] = rowsOf<{ n: number | string }>(await db.execute(sql`select count(*) as n from ${sql.identifier(table.name)} where ${where}`));
    out[table.name] = Number(row?.n ?? 0);
  }
  return out;
}
