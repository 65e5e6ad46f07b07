/**
 * Threaded comments on segments, for supervision feedback and for the whole team.
 * - GET  /api/texts/:textId/comments            threads on the layers the caller may read
 * - POST /api/texts/:textId/comments            {"layer","segmentId","body"} starts a thread; {"parentId","body"} replies
 * - POST /api/comments/:id/resolve | /reopen    the thread's starter, the segment's coder, a lead or owner
 * - GET  /api/studies/:studyId/feedback         threads on my segments started by others, and threads I wrote in that others answered
 * - GET  /api/studies/:studyId/comments/events  server-sent events naming each change the caller may see
 * Who may read a comment is who may read its layer, under the same rule as the layer rooms (so an
 * independent round's hiding holds here too). The author is the signed-in person: a body naming
 * another author is refused (the schemas are strict).
 */
import { documents, segmentComments, texts, users, type SegmentCommentRow } from '@gloss/db';
import { listSegments, readTurns, resolveSegments } from '@gloss/model';
import { and, asc, eq, inArray, isNull, or } from 'drizzle-orm';
import { Hono, type Context } from 'hono';
import { z } from 'zod';
import { can, roleIn } from '../access/index.js';
import type { CommentEvent } from '../comments/events.js';
import { HttpError, forbidden, notFound } from '../errors.js';
import { loadDoc, withDocs } from '../projection/load-doc.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { requireStore } from './segments.js';
import { streamStudyChannel } from './study-channel-stream.js';
import { studyRole, textRole } from './study-access.js';
import { comparedAs, textDocuments } from './text-layers.js';
import { idParam, readJson } from './validate.js';

const MAX_BODY = 10_000;
const body = z.string().trim().min(1, 'Write something first.').max(MAX_BODY, `At most ${MAX_BODY} characters.`);
export const NewThreadBody = z.strictObject({ layer: z.uuid(), segmentId: z.string().min(1).max(200), body });
export const ReplyBody = z.strictObject({ parentId: z.uuid(), body });

export interface CommentOut {
  id: string;
  author: { id: string | null; name: string };
  body: string;
  createdAt: string;
}
export interface ThreadOut extends CommentOut {
  textId: string;
  layer: string;
  coderId: string;
  segmentId: string;
  /** The segment's words as the documents stand now; null once the segment is gone. */
  quote: string | null;
  resolvedAt: string | null;
  resolvedBy: string | null;
  replies: CommentOut[];
}

/**
 * The words of each thread's segment as the documents stand now (`layer/segment` -> quote), resolved
 * from the text and layer documents rather than the projection, which may lag behind them.
 */
async function segmentQuotes(deps: AppDeps, roots: SegmentCommentRow[]): Promise<Map<string, string>> {
  const out = new Map<string, string>();
  const store = deps.store;
  if (!store) return out;
  const textIds = [...new Set(roots.map((r) => r.textId))];
  const textDocs = await deps.db
    .select({ id: documents.id, textId: documents.textId })
    .from(documents)
    .where(and(eq(documents.kind, 'text'), inArray(documents.textId, textIds)));
  for (const { id: textDocId, textId } of textDocs) {
    const layerIds = [...new Set(roots.filter((r) => r.textId === textId).map((r) => r.layerDocId))];
    await withDocs(store, [textDocId, ...layerIds], ([textDoc, ...layers]) => {
      const turns = readTurns(textDoc!);
      layers.forEach((layer, i) => {
        for (const seg of resolveSegments(textDoc!, listSegments(layer), turns)) {
          if (!seg.unresolved) out.set(`${layerIds[i]}/${seg.id}`, seg.quote);
        }
      });
    });
  }
  return out;
}

/** The layers of a text the person may read: the one rule, shared with the segments route. */
async function readableLayers(deps: AppDeps, textId: string, role: Parameters<typeof textDocuments>[2], userId: string) {
  const { layers } = await textDocuments(deps.db, textId, role, userId);
  return new Map(layers.map((l) => [l.layerDocId, comparedAs(l)]));
}

async function threadsOf(deps: AppDeps, roots: SegmentCommentRow[], coders: Map<string, string>): Promise<ThreadOut[]> {
  if (roots.length === 0) return [];
  const db = deps.db;
  const replies = await db
    .select()
    .from(segmentComments)
    .where(inArray(segmentComments.parentId, roots.map((r) => r.id)))
    .orderBy(asc(segmentComments.createdAt), asc(segmentComments.id));
  const authorIds = [...new Set([...roots, ...replies].map((r) => r.authorId).filter((x): x is string => !!x))];
  const names = new Map(
    authorIds.length ? (await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, authorIds))).map((u) => [u.id, u.name]) : [],
  );
  const quotes = await segmentQuotes(deps, roots);
  const out = (r: SegmentCommentRow): CommentOut => ({
    id: r.id,
    author: { id: r.authorId, name: r.authorId ? (names.get(r.authorId) ?? '') : 'a former member' },
    body: r.body,
    createdAt: r.createdAt.toISOString(),
  });
  return roots.map((r) => ({
    ...out(r),
    textId: r.textId,
    layer: r.layerDocId,
    coderId: coders.get(r.layerDocId) ?? '',
    segmentId: r.segmentId,
    quote: quotes.get(`${r.layerDocId}/${r.segmentId}`) ?? null,
    resolvedAt: r.resolvedAt?.toISOString() ?? null,
    resolvedBy: r.resolvedBy,
    replies: replies.filter((x) => x.parentId === r.id).map(out),
  }));
}

export function commentRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  // Per route, not '*': this app is mounted at the API's root beside routes that need no session.
  const session = requireSession(deps);

  const publish = async (event: CommentEvent) => {
    await deps.commentEvents?.publish(event);
  };

  app.get('/texts/:textId/comments', session, async (c) => {
    const { text, me, role } = await textRole(deps, c);
    const layers = await readableLayers(deps, text.id, role, me);
    if (layers.size === 0) return c.json({ threads: [] });
    const roots = await deps.db
      .select()
      .from(segmentComments)
      .where(and(eq(segmentComments.textId, text.id), isNull(segmentComments.parentId), inArray(segmentComments.layerDocId, [...layers.keys()])))
      .orderBy(asc(segmentComments.createdAt), asc(segmentComments.id));
    return c.json({ threads: await threadsOf(deps, roots, layers) });
  });

  app.post('/texts/:textId/comments', session, async (c) => {
    const { text, me, role } = await textRole(deps, c);
    const raw = await readJson(c, z.union([NewThreadBody, ReplyBody]));
    const layers = await readableLayers(deps, text.id, role, me);
    let root: SegmentCommentRow | undefined;
    let layer: string;
    let segmentId: string;
    if ('parentId' in raw) {
      [root] = await deps.db.select().from(segmentComments).where(eq(segmentComments.id, raw.parentId));
      if (!root || root.textId !== text.id || !layers.has(root.layerDocId)) throw notFound('Comment');
      if (root.parentId) throw new HttpError(400, 'invalid_body', 'Reply to the first comment of a thread.');
      layer = root.layerDocId;
      segmentId = root.segmentId;
    } else {
      layer = raw.layer.toLowerCase();
      segmentId = raw.segmentId;
      if (!layers.has(layer)) throw notFound('Layer');
      const doc = await loadDoc(requireStore(deps), layer);
      try {
        if (!listSegments(doc).some((s) => s.id === segmentId)) throw notFound('Segment');
      } finally {
        doc.destroy();
      }
    }
    const [row] = await deps.db
      .insert(segmentComments)
      .values({ studyId: text.studyId, textId: text.id, layerDocId: layer, segmentId, parentId: root?.id ?? null, authorId: me, body: raw.body })
      .returning();
    await publish({ action: 'added', studyId: text.studyId, textId: text.id, layerDocId: layer, threadId: root?.id ?? row!.id, commentId: row!.id });
    const [thread] = await threadsOf(deps, [root ?? row!], layers);
    return c.json({ comment: { id: row!.id, threadId: root?.id ?? row!.id }, thread }, 201);
  });

  const setResolved = (resolved: boolean) => async (c: Context<AppEnv>) => {
    const id = idParam(c, 'commentId', 'Comment');
    const me = c.get('session').user.id;
    const [root] = await deps.db.select().from(segmentComments).where(eq(segmentComments.id, id));
    if (!root) throw notFound('Comment');
    const role = await roleIn(deps.db, root.studyId, me);
    if (!role) throw notFound('Comment');
    const layers = await readableLayers(deps, root.textId, role, me);
    if (!layers.has(root.layerDocId)) throw notFound('Comment');
    if (root.parentId) throw new HttpError(400, 'invalid_body', 'Resolve or re-open the thread through its first comment.');
    const mayDecide = root.authorId === me || layers.get(root.layerDocId) === me || can(role, 'members.manage');
    if (!mayDecide) throw forbidden('Only the person who started the thread, the segment’s coder, a lead or the owner can resolve or re-open it.');
    await deps.db
      .update(segmentComments)
      .set(resolved ? { resolvedAt: new Date(), resolvedBy: me } : { resolvedAt: null, resolvedBy: null })
      .where(eq(segmentComments.id, root.id));
    await publish({ action: resolved ? 'resolved' : 'reopened', studyId: root.studyId, textId: root.textId, layerDocId: root.layerDocId, threadId: root.id, commentId: root.id });
    const [updated] = await deps.db.select().from(segmentComments).where(eq(segmentComments.id, root.id));
    const [thread] = await threadsOf(deps, [updated!], layers);
    return c.json({ thread });
  };
  app.post('/comments/:commentId/resolve', session, setResolved(true));
  app.post('/comments/:commentId/reopen', session, setResolved(false));

  app.get('/studies/:studyId/feedback', session, async (c) => {
    const { studyId, role } = await studyRole(deps, c);
    const me = c.get('session').user.id;
    const myLayers = await deps.db
      .select({ id: documents.id })
      .from(documents)
      .where(and(eq(documents.studyId, studyId), eq(documents.kind, 'layer'), eq(documents.coderId, me)));
    const mine = myLayers.map((l) => l.id);
    const wroteIn = await deps.db
      .select({ parentId: segmentComments.parentId, id: segmentComments.id })
      .from(segmentComments)
      .where(and(eq(segmentComments.studyId, studyId), eq(segmentComments.authorId, me)));
    const threadIds = [...new Set(wroteIn.map((r) => r.parentId ?? r.id))];
    const conditions = [
      ...(mine.length ? [inArray(segmentComments.layerDocId, mine)] : []),
      ...(threadIds.length ? [inArray(segmentComments.id, threadIds)] : []),
    ];
    if (conditions.length === 0) return c.json({ threads: [] });
    const roots = await deps.db
      .select()
      .from(segmentComments)
      .where(and(eq(segmentComments.studyId, studyId), isNull(segmentComments.parentId), or(...conditions)))
      .orderBy(asc(segmentComments.createdAt));
    // Only threads on layers I may still read, and only those with someone else's words in them.
    const byText = new Map<string, Map<string, string>>();
    for (const textId of new Set(roots.map((r) => r.textId))) byText.set(textId, await readableLayers(deps, textId, role, me));
    const coders = new Map([...byText.values()].flatMap((m) => [...m]));
    const visible = roots.filter((r) => byText.get(r.textId)?.has(r.layerDocId));
    const threads = (await threadsOf(deps, visible, coders)).filter((t) => [t, ...t.replies].some((x) => x.author.id !== me));
    const titles = new Map(
      threads.length
        ? (await deps.db.select({ id: texts.id, title: texts.title }).from(texts).where(inArray(texts.id, [...new Set(threads.map((t) => t.textId))]))).map((t) => [t.id, t.title])
        : [],
    );
    return c.json({ threads: threads.map((t) => ({ ...t, textTitle: titles.get(t.textId) ?? '' })) });
  });

  app.get('/studies/:studyId/comments/events', session, async (c) => {
    const { studyId } = await studyRole(deps, c);
    const me = c.get('session').user.id;
    const events = deps.commentEvents;
    if (!events) throw new HttpError(503, 'internal', 'Live comment events are not available on this server.');
    return streamStudyChannel(c, events, studyId, async (e) => {
      // Rights now, not at connect time: a role or a round may have changed since.
      const role = await roleIn(deps.db, studyId, me);
      if (!role) return 'end';
      const layers = await readableLayers(deps, e.textId, role, me);
      if (!layers.has(e.layerDocId)) return undefined;
      return { event: 'comment', data: JSON.stringify({ action: e.action, textId: e.textId, threadId: e.threadId, commentId: e.commentId }) };
    });
  });

  return app;
}
