/**
 * At start, the projection resumes where it stopped: a layer, codebook or memos document is noted for
 * projection only when its update log has moved past what `projection_state` says its rows reflect (for
 * a layer, its text's log too), or when it was never projected. So documents written without the
 * store's append (seeding, imports of whole projects), documents whose projection failed or was cut
 * short by a stop, and changes committed by a node that died before projecting reach the tables, and a
 * start with 1,000 quiet documents projects none of them. It runs on the projector's queue, in the
 * background; sync does not wait for it.
 *
 * A document's position is the highest sequence number in its snapshot or log (compaction keeps it).
 * Sequence numbers are taken at insert, not commit: a row of a dying node that commits after a higher
 * one was projected is not seen here. The node that appended it projects it after its commit
 * (withProjection), so only a node dying within that moment leaves it to the document's next change.
 */
import { rowsOf, type Db } from '@gloss/db';
import { sql } from 'drizzle-orm';
import type { Projector } from './projector.js';

/** Ids of the documents whose projection is behind their log (or missing). */
export async function documentsBehind(db: Db): Promise<string[]> {
  const result = await db.execute(sql`
    with pos as (
      select d.id, d.kind, d.text_id,
        greatest(
          coalesce((select s.seq from snapshots s where s.doc_id = d.id), -1),
          coalesce((select max(u.seq) from updates u where u.doc_id = d.id), -1)
        ) as seq
      from documents d
    )
    select p.id from pos p
      left join projection_state st on st.doc_id = p.id
      left join pos t on p.kind = 'layer' and t.kind = 'text' and t.text_id = p.text_id
    where p.kind in ('layer', 'codebook', 'memos')
      and (st.doc_id is null
        or p.seq > st.seq
        or (p.kind = 'layer' and coalesce(t.seq, -1) > coalesce(st.text_seq, -1)))
    order by p.id`);
  return rowsOf<{ id: string }>(result).map((r) => r.id);
}

export async function scheduleCatchUp(db: Db, projector: Pick<Projector, 'notify'>): Promise<number> {
  const behind = await documentsBehind(db);
  for (const id of behind) projector.notify(id);
  return behind.length;
}
