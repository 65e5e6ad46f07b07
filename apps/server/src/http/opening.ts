/**
 * GET /api/texts/:textId/opening: everything the coding view of a text opens, in one response before
 * any socket: the text document, every layer of it the caller may read (outside rounds and of the open
 * round), the study's codebook and memos, as whole-document Yjs states (model `encodeOpening`),
 * compressed on the wire. Which rooms go in is decided by the sync upgrade's own authorizer, room by
 * room, so nothing comes here that a socket would not be given (a round participant in the independent
 * phase gets no one else's layer). The decisions are left under a short-lived ticket (access/tickets.ts)
 * that the page's sockets present at their upgrade instead of being decided again. The memos state is
 * filtered for the reader exactly as their memos socket is (access/memo-readers.ts).
 *
 * `?sv=` (base64url of model `encodeStateVectors`: the state vectors of the copies the device keeps, by
 * room) asks for version 2: a granted room named there comes as what it gained since (a few bytes when
 * unchanged), with the state vector the copy then holds. Rooms are still decided exactly as without it;
 * a state vector for a room not granted changes nothing. The memos always come whole (their copy is
 * filtered for one view, and a state vector of a filtered copy would hide entries another view shows).
 */
import { promisify } from 'node:util';
import { brotliCompress, constants as zlib, gzip } from 'node:zlib';
import { documents } from '@gloss/db';
import { decodeStateVectors, encodeOpening, type OpeningDoc } from '@gloss/model';
import { and, eq, inArray, isNull, or } from 'drizzle-orm';
import { Hono } from 'hono';
import * as Y from 'yjs';
import { readableMemosState } from '../access/memo-readers.js';
import { openRoundOfText } from '../access/rounds.js';
import { TICKET_TTL_MS } from '../access/tickets.js';
import { HttpError } from '../errors.js';
import type { DocState } from '../sync/index.js';
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
    const held = heldVectors(c.req.query('sv'));
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
    for (const g of grants) {
      if (g.kind === 'memos') {
        const state = readableMemosState((await stateOf(deps, g.docId)).update, g.memoView);
        // an empty state vector: a copy kept from it is asked for whole next time
        docs.push(held ? { room: g.room, kind: g.kind, state, diff: false, stateVector: EMPTY_VECTOR } : { room: g.room, kind: g.kind, state });
        continue;
      }
      const since = held?.get(g.room);
      const s = await stateOf(deps, g.docId, since);
      docs.push(held ? { room: g.room, kind: g.kind, state: s.update, diff: since !== undefined, stateVector: s.stateVector } : { room: g.room, kind: g.kind, state: s.update });
    }
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

const EMPTY_VECTOR = new Uint8Array([0]);

/** The `sv` parameter: undefined when absent; a 400 when it is not state vectors by room. */
function heldVectors(sv: string | undefined): Map<string, Uint8Array> | undefined {
  if (sv === undefined) return undefined;
  try {
    const held = decodeStateVectors(new Uint8Array(Buffer.from(sv, 'base64url')));
    // each must read as a state vector, so a bad one is this request's error, not the server's
    for (const v of held.values()) Y.decodeStateVector(v);
    return held;
  } catch {
    throw new HttpError(400, 'bad_request', 'The sv parameter is not a list of state vectors by room.');
  }
}

/** The document's committed state (since `since` when given): from its room (kept open for the sockets that follow), else from the store. */
async function stateOf(deps: AppDeps, docId: string, since?: Uint8Array): Promise<DocState> {
  if (deps.docs) return deps.docs.state(docId, TICKET_TTL_MS, since);
  if (!deps.store) throw new HttpError(503, 'not_ready', 'This server has no document store.');
  const { updates } = await deps.store.load(docId);
  const whole = updates.length === 1 ? updates[0]! : Y.mergeUpdates(updates);
  return { update: since ? Y.diffUpdate(whole, since) : whole, stateVector: Y.encodeStateVectorFromUpdate(whole) };
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
