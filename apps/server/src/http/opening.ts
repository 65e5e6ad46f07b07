/**
 * GET /api/texts/:textId/opening: everything the coding view of a text opens, in one response before
 * any socket: the text document, every layer of it the caller may read (outside rounds and of the open
 * round), the study's codebook and memos, as whole-document Yjs states (model `encodeOpening`),
 * compressed on the wire. Which rooms go in is decided by the sync upgrade's own authorizer, room by
 * room, so nothing comes here that a socket would not be given (a round participant in the independent
 * phase gets no one else's layer). The decisions are left under a short-lived ticket (access/tickets.ts)
 * that the page's sockets present at their upgrade instead of being decided again. The memos state is
 * filtered for the reader exactly as their memos socket is (access/memo-readers.ts).
 */
import { promisify } from 'node:util';
import { brotliCompress, constants as zlib, gzip } from 'node:zlib';
import { documents } from '@gloss/db';
import { encodeOpening, type OpeningDoc } from '@gloss/model';
import { and, eq, inArray, isNull, or } from 'drizzle-orm';
import { Hono } from 'hono';
import * as Y from 'yjs';
import { readableMemosState } from '../access/memo-readers.js';
import { openRoundOfText } from '../access/rounds.js';
import { TICKET_TTL_MS } from '../access/tickets.js';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { textRole } from './study-access.js';

const brotli = promisify(brotliCompress);
const gzipAsync = promisify(gzip);

/** The order a page needs them: the words first, then the codebook the marks are drawn from, then layers, memos. */
const ORDER: Record<string, number> = { text: 0, codebook: 1, layer: 2, memos: 3 };

export function openingRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:textId/opening', async (c) => {
    const { text } = await textRole(deps, c);
    const session = c.get('session');
    if (!deps.authorizer) throw new HttpError(503, 'not_ready', 'This server cannot decide rooms ahead of the sync connections.');
    const openRound = await openRoundOfText(deps.db, text.id);
    // the same rooms GET /api/texts/:id names: the text, layers outside rounds and of the open round,
    // and the study's codebook and memos; the authorizer then keeps those this session may open
    const rows = await deps.db
      .select({ id: documents.id, kind: documents.kind })
      .from(documents)
      .where(
        or(
          and(eq(documents.textId, text.id), openRound ? or(isNull(documents.roundId), eq(documents.roundId, openRound.id)) : isNull(documents.roundId)),
          and(eq(documents.studyId, text.studyId), inArray(documents.kind, ['codebook', 'memos'])),
        ),
      );
    rows.sort((a, b) => (ORDER[a.kind] ?? 9) - (ORDER[b.kind] ?? 9));
    const stamp = deps.tickets?.stamp() ?? 0;
    const grants = await deps.authorizer.grantsFor(session, rows.map((r) => r.id));
    const docs: OpeningDoc[] = [];
    // the memos go as this reader may receive them, filtered as their socket filters (memo-readers.ts)
    for (const g of grants) docs.push({ room: g.room, kind: g.kind, state: g.kind === 'memos' ? readableMemosState(await stateOf(deps, g.docId), g.memoView) : await stateOf(deps, g.docId) });
    const ticket = deps.tickets && grants.length > 0 ? deps.tickets.issue(session.sessionId, grants, stamp).ticket : '';
    const body = encodeOpening({ ticket, docs });
    const { bytes, encoding } = await compress(body, c.req.header('accept-encoding') ?? '');
    c.header('content-type', 'application/octet-stream');
    c.header('cache-control', 'no-store');
    c.header('vary', 'accept-encoding');
    if (encoding) c.header('content-encoding', encoding);
    return c.body(bytes as Uint8Array<ArrayBuffer>);
  });

  return app;
}

/** The document's committed state: from its room (kept open for the sockets that follow), else from the store. */
async function stateOf(deps: AppDeps, docId: string): Promise<Uint8Array> {
  if (deps.docs) return deps.docs.state(docId, TICKET_TTL_MS);
  if (!deps.store) throw new HttpError(503, 'not_ready', 'This server has no document store.');
  const { updates } = await deps.store.load(docId);
  return updates.length === 1 ? updates[0]! : Y.mergeUpdates(updates);
}

/**
 * Brotli at a low quality where the browser takes it (every current one does), else gzip: a Yjs state
 * is mostly words and repeated ids, which shrink to about a quarter. Both run on libuv's thread pool,
 * not on the event loop the sync rooms share.
 */
async function compress(body: Uint8Array, accept: string): Promise<{ bytes: Uint8Array; encoding?: string }> {
  const takes = (name: string) =>
    accept.split(',').some((part) => {
      const [coding, ...params] = part.split(';').map((p) => p.trim().toLowerCase());
      const q = params.find((p) => p.startsWith('q='));
      return coding === name && (q === undefined || Number(q.slice(2)) > 0);
    });
  if (takes('br')) {
    return { bytes: await brotli(body, { params: { [zlib.BROTLI_PARAM_QUALITY]: 4, [zlib.BROTLI_PARAM_SIZE_HINT]: body.byteLength } }), encoding: 'br' };
  }
  if (takes('gzip')) return { bytes: await gzipAsync(body, { level: 4 }), encoding: 'gzip' };
  return { bytes: body };
}
