/**
 * "0 occurrences left in the database", checked, not assumed: every table of the schema that holds
 * rows of the study is searched for each original, in its text, jsonb and bytea columns (Yjs updates
 * and snapshots store strings as UTF-8, so the bytes of a name are found where it survives). The
 * pseudonym key itself is left out: it holds the originals on purpose, and the owner may delete it.
 */
import * as schema from '@gloss/db';
import { getTableConfig, PgTable, rowsOf, sql, type Db } from '@gloss/db';
import type { SQL } from 'drizzle-orm';

/** Tables of accounts (no study data) and the key itself. */
const SKIP = new Set(['users', 'sessions', 'pseudonyms']);

interface Target {
  name: string;
  filter: SQL;
  columns: Array<{ name: string; bytes: boolean }>;
}

/** How a table's rows belong to the study, by the columns it has. */
function studyFilter(name: string, columns: string[], studyId: string): SQL | null {
  if (name === 'studies') return sql`id = ${studyId}::uuid`;
  if (columns.includes('study_id')) return sql`study_id = ${studyId}::uuid`;
  const docs = sql`(select id from documents where study_id = ${studyId}::uuid)`;
  if (columns.includes('doc_id')) return sql`doc_id in ${docs}`;
  if (columns.includes('layer_doc_id')) return sql`layer_doc_id in ${docs}`;
  if (columns.includes('round_id')) return sql`round_id in (select id from rounds where study_id = ${studyId}::uuid)`;
  if (columns.includes('text_id')) return sql`text_id in (select id from texts where study_id = ${studyId}::uuid)`;
  return null;
}

function targets(studyId: string): Target[] {
  const out: Target[] = [];
  const seen = new Set<string>();
  for (const value of Object.values(schema)) {
    if (!(value instanceof PgTable)) continue;
    const config = getTableConfig(value);
    if (seen.has(config.name) || SKIP.has(config.name)) continue;
    seen.add(config.name);
    const names = config.columns.map((c) => c.name);
    const filter = studyFilter(config.name, names, studyId);
    // A table that holds study data but cannot be tied to a study would be missed: fail loudly instead.
    if (!filter) throw new Error(`scan: table ${config.name} has no column tying it to a study`);
    const columns = config.columns
      .filter((c) => ['text', 'jsonb', 'bytea'].includes(c.getSQLType()))
      .map((c) => ({ name: c.name, bytes: c.getSQLType() === 'bytea' }));
    if (columns.length > 0) out.push({ name: config.name, filter, columns });
  }
  return out;
}

export interface ScanResult {
  /** Rows (summed over originals) in which an original was found. */
  occurrences: number;
  byTable: Record<string, number>;
  tablesScanned: number;
}

export async function scanStudy(db: Db, studyId: string, originals: readonly string[]): Promise<ScanResult> {
  const byTable: Record<string, number> = {};
  let occurrences = 0;
  const list = targets(studyId);
  for (const t of list) {
    for (const original of originals) {
      if (!original) continue;
      const hit = sql.join(
        t.columns.map((c) =>
          c.bytes
            ? sql`position(convert_to(${original}, 'UTF8') in ${sql.identifier(c.name)}) > 0`
            : sql`strpos(${sql.identifier(c.name)}::text, ${original}) > 0`,
        ),
        sql` or `,
      );
      const [row] = rowsOf<{ n: number | string }>(await db.execute(sql`select count(*) as n from ${sql.identifier(t.name)} where (${t.filter}) and (${hit})`));
      const n = Number(row?.n ?? 0);
      if (n > 0) {
        byTable[t.name] = (byTable[t.name] ?? 0) + n;
        occurrences += n;
      }
    }
  }
  return { occurrences, byTable, tablesScanned: list.length };
}
