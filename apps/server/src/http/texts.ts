/** GET/POST /api/studies/:studyId/texts and GET /api/texts/:textId (its rooms, opening the caller's layer). */
import { documents, rounds, texts, users } from '@gloss/db';
import { and, asc, eq, isNull, or } from 'drizzle-orm';
import { Hono } from 'hono';
import { can, documentAccess, roomAccess } from '../access/policy.js';
import { studySupervision } from '../access/supervision.js';
import { openRoundOfText } from '../access/rounds.js';
import { layerEntries } from '../rounds/layer-entries.js';
import { addTextFromTranscript, ensureLayer } from '../admin/texts.js';
import { transcriptFromPlainText } from '../admin/text-doc.js';
import { HttpError, forbidden, notFound } from '../errors.js';
import { deleteText } from '../admin/deletion.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { NewTextBody } from './schemas.js';
import { studyRole, textRole } from './study-access.js';
import { readJson } from './validate.js';

/** The fields every answer about a text starts with (lists, creation, import). */
export function textSummary(text: Pick<typeof texts.$inferSelect, 'id' | 'title' | 'sourceFormat' | 'wordCount' | 'createdAt'>, room: string) {
  return {
    id: text.id,
    title: text.title,
    room,
    sourceFormat: text.sourceFormat,
    wordCount: text.wordCount,
    createdAt: text.createdAt.toISOString(),
  };
}

export function studyTextRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/', async (c) => {
    const { studyId, role } = await studyRole(deps, c, 'text.read');
    const me = c.get('session').user.id;
    const supervision = await studySupervision(deps.db, studyId, me);
    const all = await deps.db
      .select({ text: texts, room: documents.id })
      .from(texts)
      .innerJoin(documents, and(eq(documents.textId, texts.id), eq(documents.kind, 'text')))
      .where(eq(texts.studyId, studyId))
      .orderBy(asc(texts.createdAt), asc(texts.title));
    // A trainee lists only the texts assigned to them (policy.ts decides, as for the rooms).
    const none = { openRound: null, layerRound: null };
    const rows = all.filter(({ text }) => documentAccess(role, { kind: 'text', coderId: null }, me, none, supervision.of(text.id)).read);
    return c.json(rows.map(({ text, room }) => textSummary(text, room)));
  });

  app.post('/', async (c) => {
    const { studyId } = await studyRole(deps, c, 'text.import');
    const body = await readJson(c, NewTextBody);
    const transcript = transcriptFromPlainText(body.content, body.title);
    if (transcript.turns.length === 0) throw new HttpError(400, 'invalid_body', 'content: the transcript has no words.');
    const text = await addTextFromTranscript(deps.db, studyId, {
      title: body.title,
      transcript,
      sourceFormat: 'txt',
      createdBy: c.get('session').user.id,
    });
    return c.json(textSummary(text, text.room), 201);
  });

  return app;
}

export function textRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.delete('/:textId', async (c) => {
    const { text, role, me } = await textRole(deps, c);
    if (!can(role, 'text.delete')) throw forbidden('Only the study’s owner or a lead may delete a text.');
    const deleted = await deleteText(deps.db, text.id, me);
    await deps.liveAccess.changed({ roomIds: deleted.docIds });
    return c.body(null, 204);
  });

  app.get('/:textId', async (c) => {
    const { text, me, role, supervision } = await textRole(deps, c);
    const openRound = await openRoundOfText(deps.db, text.id);
    // While coding a text independently in a round, a participant codes in their round layer only.
    const codesInRound = openRound !== null && openRound.phase === 'independent' && openRound.participants.has(me);
    // A coder's own layer exists from the first time they open the text.
    if (can(role, 'layer.writeOwn') && !codesInRound) await ensureLayer(deps.db, text.studyId, text.id, me);
    // The text, the layers outside rounds, and the layers of the open round (closed rounds: GET /api/rounds/:id).
    const docs = await deps.db
      .select({ id: documents.id, kind: documents.kind, coderId: documents.coderId, roundId: documents.roundId, coderName: users.name })
      .from(documents)
      .leftJoin(users, eq(users.id, documents.coderId))
      .where(and(eq(documents.textId, text.id), openRound ? or(isNull(documents.roundId), eq(documents.roundId, openRound.id)) : isNull(documents.roundId)))
      .orderBy(asc(users.name));
    const textDoc = docs.find((d) => d.kind === 'text');
    if (!textDoc) throw notFound('Text document');
    const layerDocs = docs.filter((d) => d.kind === 'layer' && !(codesInRound && d.roundId === null && d.coderId === me));
    const layers = layerEntries(layerDocs, role, me, openRound, (id) => (id === openRound?.id ? openRound : null), supervision);
    let round = null;
    if (openRound) {
      const [r] = await deps.db.select({ name: rounds.name, number: rounds.number }).from(rounds).where(eq(rounds.id, openRound.id));
      round = { id: openRound.id, name: r?.name ?? '', number: r?.number ?? 0, phase: openRound.phase, participant: openRound.participants.has(me) };
    }
    return c.json({
      ...textSummary(text, textDoc.id),
      studyId: text.studyId,
      canWrite: roomAccess(role, { kind: 'text', coderId: null }, me).write,
      round,
      layers,
    });
  });

  return app;
}
