/**
 * Rows that point at a document by foreign key, found from the schema (so a new table cannot be
 * forgotten): when a purge replaces a document with a rebuilt one under a new id, the rows that hold
 * the document's content (its log, snapshot, named versions) and derived rows (projection) go with
 * the old id, and every other row pointing at it — a comment on a segment, a text's chosen reference
 * layer — is saved before the old row is deleted and written back pointing at the new id.
 */
import * as schema from '@gloss/db';
import { documents, getTableConfig, inArray, PgTable, type Db } from '@gloss/db';
import { getTableColumns } from 'drizzle-orm';
import type { PgColumn } from 'drizzle-orm/pg-core';

/** Tables whose rows of a document are its content or derived from it: deleted with it, never carried over. */
const GO_WITH_DOCUMENT = new Set(['updates', 'snapshots', 'versions', 'projected_segments', 'projection_state']);

interface Reference {
  table: PgTable;
  name: string;
  /** The TypeScript key of the column pointing at documents.id. */
  key: string;
  column: PgColumn;
  /** The key of a column pointing at the table itself (a reply's parent), written after its parent. */
  parentKey: string | null;
}

function keyOf(table: PgTable, columnName: string): string {
  const entry = Object.entries(getTableColumns(table)).find(([, c]) => c.name === columnName);
  if (!entry) throw new Error(`doc-references: no column ${columnName}`);
  return entry[0];
}

let cached: Reference[] | null = null;

export function documentReferences(): Reference[] {
  if (cached) return cached;
  const out: Reference[] = [];
  const seen = new Set<string>();
  for (const value of Object.values(schema)) {
    if (!(value instanceof PgTable)) continue;
    const config = getTableConfig(value);
    if (seen.has(config.name) || GO_WITH_DOCUMENT.has(config.name)) continue;
    seen.add(config.name);
    let parentKey: string | null = null;
    const toDocuments: string[] = [];
    for (const fk of config.foreignKeys) {
      const ref = fk.reference();
      if (ref.foreignTable === documents) toDocuments.push(ref.columns[0]!.name);
      if (ref.foreignTable === value) parentKey = keyOf(value, ref.columns[0]!.name);
    }
    for (const name of toDocuments) {
      const key = keyOf(value, name);
      out.push({ table: value, name: config.name, key, column: (getTableColumns(value) as Record<string, PgColumn>)[key]!, parentKey });
    }
  }
  cached = out;
  return out;
}

type Row = Record<string, unknown>;
export interface SavedReferences {
  rows: Array<{ ref: Reference; rows: Row[] }>;
}

/** Reads every row that points at one of `oldIds` (before those documents are deleted). */
export async function saveReferences(tx: Db, oldIds: readonly string[]): Promise<SavedReferences> {
  const rows: SavedReferences['rows'] = [];
  if (oldIds.length === 0) return { rows };
  for (const ref of documentReferences()) {
    const found = (await tx.select().from(ref.table).where(inArray(ref.column, [...oldIds]))) as Row[];
    if (found.length > 0) rows.push({ ref, rows: found });
  }
  return { rows };
}

/** Writes the saved rows back, pointing at the new ids (parents before their replies). Returns how many. */
export async function restoreReferences(tx: Db, saved: SavedReferences, newIdOf: ReadonlyMap<string, string>): Promise<number> {
  let n = 0;
  for (const { ref, rows } of saved.rows) {
    const moved = rows.map((r) => ({ ...r, [ref.key]: newIdOf.get(String(r[ref.key])) ?? r[ref.key] }));
    const pk = ref.parentKey;
    const ordered = pk === null ? [moved] : [moved.filter((r) => r[pk] == null), moved.filter((r) => r[pk] != null)];
    for (const group of ordered) {
      if (group.length === 0) continue;
      await tx.insert(ref.table).values(group as never);
      n += group.length;
    }
  }
  return n;
}
