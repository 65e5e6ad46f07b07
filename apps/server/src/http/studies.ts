/** GET/POST /api/studies, GET/PATCH /api/studies/:studyId. */
import { memoReaderView } from '../access/memo-view.js';
import { documents, memberships, studies } from '@gloss/db';
import { and, desc, eq, inArray } from 'drizzle-orm';
import { Hono } from 'hono';
import { ACTIONS, can } from '../access/policy.js';
import { createStudy } from '../admin/studies.js';
import { recordAudit } from '../admin/audit.js';
import { deleteStudy } from '../admin/deletion.js';
import { notFound } from '../errors.js';
import type { Role } from '../sync/contracts.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { NewStudyBody, UpdateStudyBody } from './schemas.js';
import { studyRole } from './study-access.js';
import { readJson } from './validate.js';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

type StudyFields = Pick<typeof studies.$inferSelect, 'id' | 'title' | 'description' | 'mode' | 'createdAt' | 'retentionUntil' | 'ethicsNote' | 'archivedAt'>;

/** The fields every answer about a study starts with, seen by someone with `role`. */
function studySummary(study: StudyFields, role: Role) {
  return {
    id: study.id,
    title: study.title,
    description: study.description,
    mode: study.mode,
    role,
    createdAt: study.createdAt.toISOString(),
    archivedAt: iso(study.archivedAt),
  };
}

/** One study in full: its summary, document rooms and what `role` may do there. */
function studyDetail(study: StudyFields, role: Role, rooms: { codebookRoom: string | null; memosRoom: string | null; memosView: string }) {
  return { ...studySummary(study, role), retentionUntil: iso(study.retentionUntil), ethicsNote: study.ethicsNote, ...rooms, permissions: ACTIONS.filter((a) => can(role, a)) };
}

export function studyRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/', async (c) => {
    const rows = await deps.db
      .select({ study: studies, role: memberships.role })
      .from(memberships)
      .innerJoin(studies, eq(studies.id, memberships.studyId))
      .where(eq(memberships.userId, c.get('session').user.id))
      .orderBy(desc(studies.createdAt));
    return c.json(rows.map(({ study, role }) => studySummary(study, role)));
  });

  app.post('/', async (c) => {
    const body = await readJson(c, NewStudyBody);
    const study = await createStudy(deps.db, {
      title: body.title,
      description: body.description,
      mode: body.mode,
      retentionUntil: body.retentionUntil ? new Date(body.retentionUntil) : null,
      ethicsNote: body.ethicsNote ?? '',
      createdBy: c.get('session').user.id,
    });
    const memosView = (await memoReaderView(deps.db, study.id, c.get('session').user.id, 'owner')).key;
    return c.json(studyDetail(study, 'owner', { codebookRoom: study.codebookRoom, memosRoom: study.memosRoom, memosView }), 201);
  });

  app.get('/:studyId', async (c) => {
    const { studyId, role } = await studyRole(deps, c);
    return c.json(await describe(studyId, role, c.get('session').user.id));
  });

  app.patch('/:studyId', async (c) => {
    const { studyId, role } = await studyRole(deps, c, 'study.update');
    const body = await readJson(c, UpdateStudyBody);
    const changes = {
      ...(body.title !== undefined && { title: body.title }),
      ...(body.description !== undefined && { description: body.description }),
      ...(body.mode !== undefined && { mode: body.mode }),
      ...(body.retentionUntil !== undefined && { retentionUntil: body.retentionUntil ? new Date(body.retentionUntil) : null }),
      ...(body.ethicsNote !== undefined && { ethicsNote: body.ethicsNote }),
      ...(body.archived !== undefined && { archivedAt: body.archived ? new Date() : null }),
    };
    await deps.db.update(studies).set(changes).where(eq(studies.id, studyId));
    const action = body.archived === true ? 'study.archive' : body.archived === false ? 'study.unarchive' : 'study.update';
    await recordAudit(deps.db, { userId: c.get('session').user.id, studyId, action, target: studyId, detail: body });
    return c.json(await describe(studyId, role, c.get('session').user.id));
  });

  app.delete('/:studyId', async (c) => {
    const { studyId } = await studyRole(deps, c, 'study.delete');
    await deleteStudy(deps.db, studyId, c.get('session').user.id);
    // Open sockets of its documents close (4404, on every node) now that the rows are gone.
    await deps.liveAccess.changed({ studyId });
    return c.body(null, 204);
  });

  async function describe(studyId: string, role: Role, userId: string) {
    const [study] = await deps.db.select().from(studies).where(eq(studies.id, studyId));
    if (!study) throw notFound('Study');
    const docs = await deps.db
      .select({ id: documents.id, kind: documents.kind })
      .from(documents)
      .where(and(eq(documents.studyId, studyId), inArray(documents.kind, ['codebook', 'memos'])));
    return studyDetail(study, role, {
      codebookRoom: docs.find((d) => d.kind === 'codebook')?.id ?? null,
      memosRoom: docs.find((d) => d.kind === 'memos')?.id ?? null,
      // which memos this reader receives: the web app keeps one offline copy per view (memo-view.ts)
      memosView: (await memoReaderView(deps.db, studyId, userId, role)).key,
    });
  }

  return app;
}
