/**
 * Calibration rounds (issue 8): POST/GET /api/studies/:studyId/rounds; GET /api/rounds/:roundId;
 * POST …/reveal and …/close (owner, lead); POST/DELETE …/texts/:textId/done (a participant);
 * GET …/progress (owner, lead: everyone's; a participant: their own). Starting stamps the codebook in
 * force as a named version; revealing stamps the round's number into the codebook so definition edits
 * from then on carry it in the change log. Every phase change re-checks open connections.
 */
import { type RoundRow, documents, inArray, users } from '@gloss/db';
import { enterRound } from '@gloss/model';
import { and, eq } from 'drizzle-orm';
import { Hono, type Context } from 'hono';
import * as Y from 'yjs';
import { can } from '../access/policy.js';
import { roleIn } from '../access/membership.js';
import { supervisionFor } from '../access/supervision.js';
import { openRoundOfText, type RoundFacts } from '../access/rounds.js';
import { HttpError, forbidden, notFound } from '../errors.js';
import { recordAudit } from '../admin/audit.js';
import { roundAgreement, roundReport } from '../rounds/report-data.js';
import { toCsv, toMarkdown } from '../rounds/report.js';
import { AgreementQuery } from './agreement.js';
import { loadDoc } from '../projection/load-doc.js';
import { changeDoc } from '../rounds/doc-change.js';
import { layerEntries } from '../rounds/layer-entries.js';
import { roundProgress } from '../rounds/progress.js';
import { advanceRound, checkNewRound, doneMarks, findRound, insertRound, roundLayers, roundMembers, roundsOfStudy, setDone, setWordsRead, type RoundMembers } from '../rounds/records.js';
import type { Role } from '../sync/contracts.js';
import type { AppDeps, AppEnv } from './context.js';
import { requireSession } from './middleware.js';
import { heavyOf, heavyRoute } from './heavy-route.js';
import { DoneBody, NewRoundBody, ReadBody } from './schemas.js';
import { requireStore } from './segments.js';
import { studyRole } from './study-access.js';
import { codebookDocId } from './text-layers.js';
import { idParam, readJson } from './validate.js';
import { logFor } from './log.js';

const iso = (d: Date | null) => (d ? d.toISOString() : null);

export function roundSummary(r: RoundRow, m: RoundMembers, me: string, role: Role, creatorName: string | null, done: string[]) {
  return {
    id: r.id,
    studyId: r.studyId,
    number: r.number,
    name: r.name,
    purpose: r.purpose,
    unit: r.unit,
    statistic: r.statistic,
    phase: r.phase,
    codebookVersionId: r.codebookVersionId,
    createdAt: r.createdAt.toISOString(),
    revealedAt: iso(r.revealedAt),
    closedAt: iso(r.closedAt),
    createdBy: r.createdBy ? { id: r.createdBy, name: creatorName ?? '' } : null,
    texts: m.texts,
    participants: m.participants,
    me: { participant: m.participants.some((p) => p.id === me), canManage: can(role, 'round.manage'), done },
  };
}

async function userNames(deps: AppDeps, ids: Array<string | null>): Promise<Map<string, string>> {
  const want = [...new Set(ids.filter((x): x is string => x !== null))];
  if (want.length === 0) return new Map();
  const rows = await deps.db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, want));
  return new Map(rows.map((r) => [r.id, r.name]));
}

/** Every room whose rights a round's phase change can alter: its texts' text documents and all their layers. */
async function roomsOfRoundTexts(deps: AppDeps, textIds: string[]): Promise<string[]> {
  if (textIds.length === 0) return [];
  const rows = await deps.db.select({ id: documents.id }).from(documents).where(inArray(documents.textId, textIds));
  return rows.map((r) => r.id);
}

/**
 * A round started, revealed or closed changes who may open its texts' rooms: open connections to them
 * are re-checked on every node (closed when they lost read, downgraded when they lost write, presence
 * filtered when their user now codes independently).
 */
async function rightsChanged(deps: AppDeps, studyId: string, textIds: string[]): Promise<void> {
  // the study's memos room too: jottings on the round's segments open and close with the phase (memo-view.ts)
  const memos = await deps.db.select({ id: documents.id }).from(documents).where(and(eq(documents.studyId, studyId), eq(documents.kind, 'memos')));
  await deps.liveAccess.changed({ studyId, roomIds: [...(await roomsOfRoundTexts(deps, textIds)), ...memos.map((r) => r.id)] });
}

/** The round named by `:roundId` and the caller's role in its study (404 for non-members, so ids are not probed). */
export async function roundRole(deps: AppDeps, c: Context<AppEnv>, action?: 'round.read' | 'round.manage') {
  const roundId = idParam(c, 'roundId', 'Round');
  const round = await findRound(deps.db, roundId);
  if (!round) throw notFound('Round');
  const me = c.get('session').user.id;
  const role = await roleIn(deps.db, round.studyId, me);
  if (!role) throw notFound('Round');
  if (action && !can(role, action)) throw forbidden(action === 'round.manage' ? 'Only the study’s owner and leads run rounds.' : undefined);
  const members = (await roundMembers(deps.db, [round.id])).get(round.id)!;
  const facts: RoundFacts = { id: round.id, studyId: round.studyId, phase: round.phase, participants: new Set(members.participants.map((p) => p.id)) };
  // A trainee sees only rounds they take part in: a round names its texts, which are not assigned to them otherwise.
  if (!can(role, 'text.readUnassigned') && !facts.participants.has(me)) throw notFound('Round');
  return { round, role, me, members, facts };
}

export function studyRoundRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.post('/', async (c) => {
    const store = requireStore(deps);
    const { studyId, role } = await studyRole(deps, c, 'round.manage');
    const parsed = await readJson(c, NewRoundBody);
    // Ids are stored lower-case (uuid columns answer in lower case); compare them so.
    const body = { ...parsed, textIds: parsed.textIds.map((id) => id.toLowerCase()), participantIds: parsed.participantIds.map((id) => id.toLowerCase()) };
    const me = c.get('session').user.id;
    await checkNewRound(deps.db, { studyId, textIds: body.textIds, participantIds: body.participantIds });
    const cbId = await codebookDocId(deps.db, studyId);
    let codebook: { docId: string; snapshot: Uint8Array } | null = null;
    if (cbId) {
      const cb = await loadDoc(store, cbId);
      try {
        codebook = { docId: cbId, snapshot: Y.encodeSnapshot(Y.snapshot(cb)) };
      } finally {
        cb.destroy();
      }
    }
    const round = await insertRound(deps.db, {
      studyId,
      name: body.name,
      purpose: body.purpose ?? '',
      textIds: body.textIds,
      participantIds: body.participantIds,
      unit: body.unit,
      statistic: body.statistic,
      createdBy: me,
      codebook,
    });
    await rightsChanged(deps, studyId, body.textIds);
    const members = (await roundMembers(deps.db, [round.id])).get(round.id)!;
    return c.json(roundSummary(round, members, me, role, c.get('session').user.name, []), 201);
  });

  app.get('/', async (c) => {
    const { studyId, role } = await studyRole(deps, c, 'round.read');
    const me = c.get('session').user.id;
    const all = await roundsOfStudy(deps.db, studyId);
    const allMembers = await roundMembers(deps.db, all.map((r) => r.id));
    // A trainee lists only the rounds they take part in (their texts are assigned to them by the round).
    const rows = can(role, 'text.readUnassigned') ? all : all.filter((r) => allMembers.get(r.id)!.participants.some((p) => p.id === me));
    const members = allMembers;
    const names = await userNames(deps, rows.map((r) => r.createdBy));
    const mine = new Map<string, string[]>();
    for (const r of rows) mine.set(r.id, (await doneMarks(deps.db, r.id)).filter((d) => d.userId === me).map((d) => d.textId));
    return c.json(rows.map((r) => roundSummary(r, members.get(r.id)!, me, role, r.createdBy ? (names.get(r.createdBy) ?? null) : null, mine.get(r.id) ?? [])));
  });

  return app;
}

export function roundRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:roundId', async (c) => {
    const { round, role, me, members, facts } = await roundRole(deps, c, 'round.read');
    const layers = await roundLayers(deps.db, round.id);
    const names = await userNames(deps, [round.createdBy, ...layers.map((l) => l.coderId)]);
    const textDocs = await deps.db
      .select({ id: documents.id, textId: documents.textId })
      .from(documents)
      .where(inArray(documents.textId, members.texts.map((t) => t.id)));
    const texts = [];
    for (const t of members.texts) {
      // A closed round's text may be in a later open round, whose rules then apply to its rooms.
      const openRound = round.phase === 'closed' ? await openRoundOfText(deps.db, t.id) : facts;
      const docs = layers.filter((l) => l.textId === t.id).map((l) => ({ ...l, coderName: l.coderId ? (names.get(l.coderId) ?? '') : null }));
      const room = textDocs.find((d) => d.textId === t.id && !layers.some((l) => l.id === d.id));
      // The consensus room's id is named to all (opening it is decided at the upgrade, like any room).
      const consensusRoom = layers.find((l) => l.textId === t.id && l.coderId === null)?.id ?? null;
      texts.push({ ...t, room: room?.id ?? '', consensusRoom, layers: layerEntries(docs, role, me, openRound, () => facts, await supervisionFor(deps.db, t.id, me)) });
    }
    const done = (await doneMarks(deps.db, round.id)).filter((d) => d.userId === me).map((d) => d.textId);
    const creator = round.createdBy ? (names.get(round.createdBy) ?? null) : null;
    return c.json({ ...roundSummary(round, members, me, role, creator, done), texts });
  });

  const advance = (to: 'revealed' | 'closed') => async (c: Context<AppEnv>) => {
    const { round: before, role, me, members } = await roundRole(deps, c, 'round.manage');
    const round = await advanceRound(deps.db, before.id, to, me);
    let warning: string | undefined;
    if (to === 'revealed' && deps.docs && deps.store) {
      // From the reveal on, definition edits are stamped with this round in the codebook's change log.
      const cbId = await codebookDocId(deps.db, round.studyId);
      if (cbId) {
        await changeDoc(deps.store, deps.docs, cbId, me, (cb) => {
          enterRound(cb, round.number, { by: me }, `round ${round.number} revealed: ${round.name}`);
        }).catch((err: unknown) => {
          logFor(deps).error({ err }, 'codebook could not be stamped with the revealed round');
          warning = 'The round is revealed, but the codebook could not be stamped with it: definition edits will carry the previous round number.';
        });
      }
    }
    await rightsChanged(deps, round.studyId, members.texts.map((t) => t.id));
    const done = (await doneMarks(deps.db, round.id)).filter((d) => d.userId === me).map((d) => d.textId);
    const names = await userNames(deps, [round.createdBy]);
    return c.json({ ...roundSummary(round, members, me, role, round.createdBy ? (names.get(round.createdBy) ?? null) : null, done), ...(warning ? { warning } : {}) });
  };
  app.post('/:roundId/reveal', advance('revealed'));
  app.post('/:roundId/close', advance('closed'));

  const markDone = (done: boolean) => async (c: Context<AppEnv>) => {
    const { round, me, members } = await roundRole(deps, c, 'round.read');
    const textId = idParam(c, 'textId', 'Text');
    if (!members.texts.some((t) => t.id === textId)) throw notFound('Text in this round');
    if (!members.participants.some((p) => p.id === me)) throw forbidden('Only the round’s participants mark texts done.');
    if (c.req.method === 'PUT') {
      const body = await readJson(c, DoneBody);
      done = body.done;
    }
    const at = await setDone(deps.db, round, textId, me, done);
    return c.json({ roundId: round.id, textId, done: at !== null, doneAt: at ? at.toISOString() : null });
  };
  app.post('/:roundId/texts/:textId/done', markDone(true));
  app.delete('/:roundId/texts/:textId/done', markDone(false));
  app.put('/:roundId/texts/:textId/done', markDone(true));

  app.put('/:roundId/texts/:textId/read', async (c) => {
    const { round, me, members } = await roundRole(deps, c, 'round.read');
    const textId = idParam(c, 'textId', 'Text');
    const text = members.texts.find((t) => t.id === textId);
    if (!text) throw notFound('Text in this round');
    if (!members.participants.some((p) => p.id === me)) throw forbidden('Only the round’s participants report their reading.');
    const { words } = await readJson(c, ReadBody);
    const wordsRead = await setWordsRead(deps.db, round, text, me, words);
    return c.json({ roundId: round.id, textId, wordsRead });
  });

  app.get('/:roundId/progress', async (c) => {
    const store = requireStore(deps);
    const { round, role, me, members } = await roundRole(deps, c, 'round.read');
    const manages = can(role, 'round.manage');
    const participant = members.participants.some((p) => p.id === me);
    if (!manages && !participant) throw forbidden('Progress is shown to the round’s lead and owner, and to each participant for themselves.');
    const rows = await roundProgress(deps.db, store, round, members, manages ? null : me);
    return c.json({ roundId: round.id, phase: round.phase, rows });
  });

  /** The round's agreement and report compare everyone's coding: shown after the reveal only (to the lead too). */
  const mayCompare = (round: RoundRow, role: Role, participant: boolean) => {
    if (round.phase === 'independent') throw forbidden('The round is still in its independent phase: its agreement is computed after the reveal.');
    if (!can(role, 'agreement.read') && !participant) throw forbidden('A round’s agreement is shown to its participants, the study’s owner and leads, and observers.');
  };

  app.get('/:roundId/agreement', heavyRoute(deps), async (c) => {
    const store = requireStore(deps);
    const { round, role, me, members } = await roundRole(deps, c, 'round.read');
    mayCompare(round, role, members.participants.some((p) => p.id === me));
    const q = RoundAgreementQuery.safeParse(c.req.query());
    if (!q.success) throw new HttpError(400, 'bad_request', `${q.error.issues[0]!.path.join('.') || 'query'}: ${q.error.issues[0]!.message}`);
    const { body, coderIds } = await roundAgreement(deps.db, store, round, members, {
      codes: q.data.codes,
      ...(q.data.bootstrap > 0 ? { bootstrap: { replicates: q.data.bootstrap, seed: q.data.seed } } : {}),
      heavy: heavyOf(deps),
    });
    await recordAudit(deps.db, { userId: me, studyId: round.studyId, action: 'agreement.view', target: round.id, detail: { round: round.number, coders: coderIds, unit: round.unit, statistic: round.statistic } });
    return c.json(body);
  });

  app.get('/:roundId/report', heavyRoute(deps), async (c) => {
    const store = requireStore(deps);
    const { round, role, me, members } = await roundRole(deps, c, 'round.read');
    mayCompare(round, role, members.participants.some((p) => p.id === me));
    const format = c.req.query('format') ?? 'json';
    if (format !== 'json' && format !== 'md' && format !== 'csv') throw new HttpError(400, 'bad_request', 'format: json, md or csv.');
    const report = await roundReport(deps.db, store, round, members, heavyOf(deps));
    await recordAudit(deps.db, { userId: me, studyId: round.studyId, action: 'round.report', target: round.id, detail: { format } });
    if (format === 'json') return c.json(report);
    const file = `round-${round.number}-report.${format}`;
    c.header('content-disposition', `attachment; filename="${file}"`);
    if (format === 'md') return c.body(toMarkdown(report), 200, { 'content-type': 'text/markdown; charset=utf-8' });
    return c.body(toCsv(report), 200, { 'content-type': 'text/csv; charset=utf-8' });
  });

  return app;
}

const RoundAgreementQuery = AgreementQuery.pick({ codes: true, bootstrap: true, seed: true });
