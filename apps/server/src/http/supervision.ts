/**
 * Supervision of trainees (issue 9):
 * - GET  /api/studies/:studyId/assignments            supervisors: all; anyone else: their own (with review state)
 * - POST /api/studies/:studyId/assignments            {textId, userId} assign a text (to a trainee or a coder)
 * - DELETE /api/studies/:studyId/assignments/:textId/:userId   unassign (open sockets re-checked: a trainee's close)
 * - POST /api/studies/:studyId/assignments/:textId/:userId/review   {state, note} returned / accepted
 * - POST /api/studies/:studyId/assignments/:textId/:userId/share    {shared} share the comparison with the assignee
 * - GET/PUT /api/texts/:textId/reference              the text's reference layer
 * - GET/PUT /api/studies/:studyId/supervision/settings  tolerance (words) and drift threshold
 * - GET  /api/studies/:studyId/supervision/progress   agreement with the reference per trainee per round
 * Supervisors are those with `supervision.manage` (owner, lead). Every change that alters who may read a
 * room calls live access, so open connections follow at once on every node.
 */
import { documents, texts } from '@gloss/db';
import { and, eq } from 'drizzle-orm';
import { Hono } from 'hono';
import { can, documentAccess } from '../access/policy.js';
import { roleIn } from '../access/membership.js';
import { roundsForDocument } from '../access/rounds.js';
import { supervisionFor } from '../access/supervision.js';
import { recordAudit } from '../admin/audit.js';
import { HttpError, forbidden, notFound } from '../errors.js';
import { traineeProgress, PROGRESS_SOURCES } from '../supervision/progress.js';
import { assignText, findAssignment, listAssignments, referenceOf, roomsOfText, saveSettings, setReference, setReview, setShared, settingsOf, unassignText } from '../supervision/records.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { AssignBody, ReferenceBody, ReviewBody, ShareBody, SupervisionSettingsBody } from './schemas.js';
import { requireStore } from './segments.js';
import { studyRole, textRole } from './study-access.js';
import { idParam, readJson } from './validate.js';

const SUPERVISORS_ONLY = 'Only the study’s owner and leads supervise: assign texts, choose references and review.';

export function studySupervisionRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  const manager = async (c: Parameters<typeof studyRole>[1]) => {
    const r = await studyRole(deps, c);
    if (!can(r.role, 'supervision.manage')) throw forbidden(SUPERVISORS_ONLY);
    return r;
  };
  /** The assignment named by the path, in this study. */
  const named = async (c: Parameters<typeof studyRole>[1], studyId: string) => {
    const textId = idParam(c, 'textId', 'Text');
    const userId = idParam(c, 'userId', 'Person');
    const row = await findAssignment(deps.db, textId, userId);
    if (!row || row.studyId !== studyId) throw notFound('Assignment');
    return row;
  };
  const textRooms = async (studyId: string, textId: string) => deps.liveAccess.changed({ studyId, roomIds: await roomsOfText(deps.db, textId) });

  app.get('/assignments', async (c) => {
    const { studyId, role } = await studyRole(deps, c);
    const me = c.get('session').user.id;
    return c.json({ assignments: await listAssignments(deps.db, studyId, can(role, 'supervision.manage') ? undefined : me) });
  });

  app.post('/assignments', async (c) => {
    const { studyId } = await manager(c);
    const body = await readJson(c, AssignBody);
    const textId = body.textId.toLowerCase();
    const userId = body.userId.toLowerCase();
    const [text] = await deps.db.select({ studyId: texts.studyId }).from(texts).where(eq(texts.id, textId));
    if (!text || text.studyId !== studyId) throw notFound('Text');
    const role = await roleIn(deps.db, studyId, userId);
    if (role !== 'trainee' && role !== 'coder') throw new HttpError(400, 'invalid_body', 'userId: texts are assigned to trainees and coders of this study.');
    const me = c.get('session').user.id;
    await assignText(deps.db, { studyId, textId, userId, assignedBy: me });
    await recordAudit(deps.db, { userId: me, studyId, action: 'text.assign', target: textId, detail: { userId } });
    await deps.liveAccess.changed({ studyId, userId });
    const [out] = (await listAssignments(deps.db, studyId, userId)).filter((a) => a.textId === textId);
    return c.json(out, 201);
  });

  app.delete('/assignments/:textId/:userId', async (c) => {
    const { studyId } = await manager(c);
    const row = await named(c, studyId);
    await unassignText(deps.db, row.textId, row.userId);
    await recordAudit(deps.db, { userId: c.get('session').user.id, studyId, action: 'text.unassign', target: row.textId, detail: { userId: row.userId } });
    // A trainee loses the text: their open connections to its rooms close now, on every node.
    await textRooms(studyId, row.textId);
    return c.body(null, 204);
  });

  app.post('/assignments/:textId/:userId/review', async (c) => {
    const { studyId } = await manager(c);
    const row = await named(c, studyId);
    const body = await readJson(c, ReviewBody);
    if (body.state === 'returned' && body.note.trim() === '') throw new HttpError(400, 'invalid_body', 'note: say what to look at again when returning a text.');
    const me = c.get('session').user.id;
    await setReview(deps.db, row.textId, row.userId, { state: body.state, note: body.note.trim(), by: me });
    await recordAudit(deps.db, { userId: me, studyId, action: `review.${body.state}`, target: row.textId, detail: { userId: row.userId } });
    const [out] = (await listAssignments(deps.db, studyId, row.userId)).filter((a) => a.textId === row.textId);
    return c.json(out);
  });

  app.post('/assignments/:textId/:userId/share', async (c) => {
    const { studyId } = await manager(c);
    const row = await named(c, studyId);
    const body = await readJson(c, ShareBody);
    await setShared(deps.db, row.textId, row.userId, body.shared);
    await recordAudit(deps.db, { userId: c.get('session').user.id, studyId, action: body.shared ? 'comparison.share' : 'comparison.unshare', target: row.textId, detail: { userId: row.userId } });
    await textRooms(studyId, row.textId);
    const [out] = (await listAssignments(deps.db, studyId, row.userId)).filter((a) => a.textId === row.textId);
    return c.json(out);
  });

  app.get('/supervision/settings', async (c) => {
    const { studyId } = await studyRole(deps, c);
    return c.json(await settingsOf(deps.db, studyId));
  });

  app.put('/supervision/settings', async (c) => {
    const { studyId } = await manager(c);
    const body = await readJson(c, SupervisionSettingsBody);
    await saveSettings(deps.db, studyId, body);
    return c.json(await settingsOf(deps.db, studyId));
  });

  app.get('/supervision/progress', async (c) => {
    const { studyId } = await manager(c);
    const settings = await settingsOf(deps.db, studyId);
    const progress = await traineeProgress(deps.db, requireStore(deps), studyId, settings);
    return c.json({ ...progress, settings, sources: PROGRESS_SOURCES });
  });

  return app;
}

export function textReferenceRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:textId/reference', async (c) => {
    const { text } = await textRole(deps, c);
    return c.json({ textId: text.id, layer: await referenceOf(deps.db, text.id) });
  });

  app.put('/:textId/reference', async (c) => {
    const { text, me, role } = await textRole(deps, c);
    if (!can(role, 'supervision.manage')) throw forbidden(SUPERVISORS_ONLY);
    const body = await readJson(c, ReferenceBody);
    if (body.layer !== null) {
      const room = body.layer.toLowerCase();
      const [doc] = await deps.db.select().from(documents).where(and(eq(documents.id, room), eq(documents.kind, 'layer')));
      if (!doc || doc.textId !== text.id) throw notFound('Layer on this text');
      // Only a layer the supervisor may read now (not a round layer still coded independently).
      const access = documentAccess(role, doc, me, await roundsForDocument(deps.db, doc), await supervisionFor(deps.db, text.id, me));
      if (!access.read) throw forbidden(access.reason ?? 'You may not read that layer.');
    }
    const before = await referenceOf(deps.db, text.id);
    await setReference(deps.db, text.id, body.layer?.toLowerCase() ?? null, me);
    await recordAudit(deps.db, { userId: me, studyId: text.studyId, action: 'reference.choose', target: text.id, detail: { layer: body.layer } });
    // Shared comparisons now point at another layer: re-check open connections to the old and new one.
    // The memos room too: a trainee's view of jottings on the shared layer's segments follows it.
    const rooms = [before, body.layer?.toLowerCase()].filter((x): x is string => !!x);
    if (rooms.length) await deps.liveAccess.changed({ studyId: text.studyId, roomIds: [...rooms, ...(await roomsOfText(deps.db, text.id))] });
    return c.json({ textId: text.id, layer: await referenceOf(deps.db, text.id) });
  });

  return app;
}
