/**
 * RoomAuthorizer for the sync endpoint: at the WebSocket upgrade, check the Origin, the session
 * cookie, the room (a documents-table id) and the caller's role in the room's study.
 * Errors: 403 bad origin, 401 no valid session, 404 unknown room, 403 not a member / may not read.
 * `recheck` runs the same decision for an open connection (live access: a member removed, a role
 * changed, a session ended), from its session id instead of the HTTP request.
 */
import type { IncomingMessage } from 'node:http';
import type { Db, documents } from '@gloss/db';
import { isAllowedOrigin } from '../auth/origin.js';
import { readSessionToken } from '../auth/cookies.js';
import { looksLikeToken, sessionIdFromToken } from '../auth/tokens.js';
import type { SessionService, ValidSession } from '../auth/sessions.js';
import { recordAudits } from '../admin/audit.js';
import { HttpError, forbidden, notFound, unauthenticated } from '../errors.js';
import type { Recheck, Role, RoomAuthorizer, RoomGrant } from '../sync/contracts.js';
import { AppCloseCode } from '../sync/errors.js';
import { isUuid } from '../ids.js';
import { findDocuments, findRetiredMany, retiredClientsOfMany, rolesIn } from './membership.js';
import { memoReaderView, type MemoReaderView } from './memo-view.js';
import { documentAccess, type DocSupervision } from './policy.js';
import { roundsForDocument, type DocRounds } from './rounds.js';
import { supervisionFor } from './supervision.js';
import type { TicketBook } from './tickets.js';

export interface AuthorizerDeps {
  db: Db;
  sessions: SessionService;
  publicUrl: string | undefined;
  now?: () => number;
  /** Grants decided ahead for a page's sockets (tickets.ts); absent: every upgrade decides afresh. */
  tickets?: Pick<TicketBook, 'redeem'>;
}

/** The authorizer with the opening request's side: deciding many rooms of one session at once. */
export interface SessionAuthorizer extends RoomAuthorizer {
  /**
   * The grants of those `rooms` the session may open now, decided exactly as at the upgrade (and the
   * viewing of others' layers recorded in the access log as the upgrade records it); rooms it may not
   * open are left out, with no word of why.
   */
  grantsFor(session: ValidSession, rooms: readonly string[]): Promise<RoomGrant[]>;
}

/** Plain words for a connection closed by a re-check (WebSocket close reasons: at most 123 bytes). */
export const LOST_ACCESS = {
  signedOut: 'You were signed out. Sign in again to continue.',
  expired: 'Your session expired. Sign in again to continue.',
  notMember: 'You are no longer a member of this study.',
  mayNotRead: 'Your role in this study no longer lets you open this document.',
  gone: 'This document was deleted.',
  replaced: 'This text was rebuilt after de-identification: your copy on this device must be discarded.',
} as const;

/** `viewed`: someone else's layer (its coder and text), for the access log. */
type Decision =
  | { ok: true; grant: RoomGrant; viewed: { coderId: string | null; textId: string | null } | null }
  | { ok: false; status: 403 | 404 | 410; reason: string; closeCode?: number };

export function createRoomAuthorizer({ db, sessions, publicUrl, now = Date.now, tickets }: AuthorizerDeps): SessionAuthorizer {
  /** The one rule: may this signed-in person open this room now, and may they write? */
  async function decide(session: ValidSession, room: string): Promise<Decision> {
    return decideFrom(session, room, await roomFacts(db, session.user.id, [room]));
  }

  /** Who viewed whose layer is part of the access log (DESIGN §6). */
  async function audit(decision: Decision & { ok: true }): Promise<void> {
    await auditMany([decision]);
  }
  async function auditMany(decisions: ReadonlyArray<Decision & { ok: true }>): Promise<void> {
    const entries = decisions.flatMap(({ grant, viewed }) =>
      viewed ? [{ userId: grant.userId, studyId: grant.studyId, action: 'layer.view', target: grant.docId, detail: viewed }] : [],
    );
    if (entries.length > 0) await recordAudits(db, entries);
  }

  return {
    async grantsFor(session, rooms) {
      // One set of lookups for all of a page's rooms (they share a study and mostly a text), then the
      // same decision per room as at the upgrade; the layer views go into the access log in one insert.
      const facts = await roomFacts(db, session.user.id, rooms);
      const granted = rooms.map((room) => decideFrom(session, room, facts)).filter((d): d is Decision & { ok: true } => d.ok);
      await auditMany(granted);
      return granted.map((d) => d.grant);
    },

    async authorize(req: IncomingMessage, room: string): Promise<RoomGrant> {
      const header = (name: string) => {
        const v = req.headers[name];
        return Array.isArray(v) ? v[0] : v;
      };
      const host = header('host');
      const scheme = (req.socket as { encrypted?: boolean } | undefined)?.encrypted ? 'https' : 'http';
      if (!isAllowedOrigin({ origin: header('origin'), referer: header('referer'), selfOrigin: host ? `${scheme}://${host}` : null }, publicUrl)) {
        throw new HttpError(403, 'bad_origin', 'This origin may not open sync connections.');
      }
      const token = readSessionToken(header('cookie'));
      // A ticket from this page's opening request: the grant was decided (and audited) there, for this
      // session, and nothing it depends on has changed since (tickets.ts); the cookie must still match.
      const ticket = tickets && token && looksLikeToken(token) ? ticketOf(req.url) : null;
      if (ticket) {
        const grant = tickets!.redeem(ticket, sessionIdFromToken(token!), room);
        if (grant) return grant;
      }
      const session = token ? await sessions.validate(token, { extend: false }) : null;
      if (!session) throw unauthenticated();

      const decision = await decide(session, room);
      if (!decision.ok) {
        if (decision.status === 404) throw notFound('Room');
        if (decision.status === 410) throw new HttpError(410, 'document_replaced', decision.reason);
        throw forbidden(decision.reason === LOST_ACCESS.notMember ? 'You are not a member of this study.' : decision.reason === LOST_ACCESS.mayNotRead ? undefined : decision.reason);
      }
      await audit(decision);
      return decision.grant;
    },

    async recheck(grant: RoomGrant): Promise<Recheck> {
      const session = await sessions.check(grant.sessionId);
      if (!session) {
        const expired = now() >= grant.sessionExpiresAt.getTime();
        return { ok: false, reason: expired ? LOST_ACCESS.expired : LOST_ACCESS.signedOut };
      }
      const decision = await decide(session, grant.docId);
      return decision.ok ? { ok: true, grant: decision.grant } : { ok: false, reason: decision.reason, ...(decision.closeCode ? { closeCode: decision.closeCode } : {}) };
    },
  };
}

/** What deciding about some rooms needs to know, read for all of them at once. */
interface RoomFacts {
  retired: Map<string, { studyId: string }>;
  docs: Map<string, DocRow>;
  roles: Map<string, Role>;
  rounds: Map<string, DocRounds>;
  supervision: Map<string, DocSupervision>;
  /** Per rebuilt document, the client ids of the documents it replaced. */
  retiredClients: Map<string, number[]>;
  /** Per study whose memos room is asked for: which of its entries this reader receives. */
  memoViews: Map<string, MemoReaderView>;
}
type DocRow = typeof documents.$inferSelect;

const key = (doc: { textId: string | null; roundId: string | null }) => `${doc.textId ?? ''}/${doc.roundId ?? ''}`;

/**
 * The rows every decision reads, for many rooms in a fixed number of statements: retired rooms,
 * documents, the person's roles in their studies, and per text its rounds and supervision facts (the
 * same functions the single decision used, called once per distinct text instead of once per room).
 * Rounds and supervision are read only where the person is a member: a non-member is refused before.
 */
async function roomFacts(db: Db, userId: string, rooms: readonly string[]): Promise<RoomFacts> {
  const ids = [...new Set(rooms.filter(isUuid).map((r) => r.toLowerCase()))];
  const [retired, docs] = await Promise.all([findRetiredMany(db, ids), findDocuments(db, ids)]);
  const roles = await rolesIn(db, [...new Set([...retired.values(), ...docs.values()].map((r) => r.studyId))], userId);
  const member = [...docs.values()].filter((d) => roles.has(d.studyId));
  const textBound = new Map(member.map((d) => [key(d), d]));
  const [rounds, supervision, retiredClients, memoViews] = await Promise.all([
    Promise.all([...textBound].map(async ([k, d]) => [k, await roundsForDocument(db, d)] as const)),
    Promise.all([...new Set(member.map((d) => d.textId))].map(async (t) => [t ?? '', await supervisionFor(db, t, userId)] as const)),
    retiredClientsOfMany(db, member.map((d) => d.id)),
    Promise.all(
      [...new Set(member.filter((d) => d.kind === 'memos').map((d) => d.studyId))].map(async (studyId) => [studyId, await memoReaderView(db, studyId, userId, roles.get(studyId)!)] as const),
    ),
  ]);
  return { retired, docs, roles, rounds: new Map(rounds), supervision: new Map(supervision), retiredClients, memoViews: new Map(memoViews) };
}

/** The decision about one room from facts read ahead (pure): retired, unknown, not a member, then rounds and supervision. */
function decideFrom(session: ValidSession, room: string, facts: RoomFacts): Decision {
  const id = room.toLowerCase();
  // A purge retires the text's old room before it deletes it: connections to it must drop their copy.
  const retired = isUuid(room) ? facts.retired.get(id) : undefined;
  if (retired) {
    if (!facts.roles.get(retired.studyId)) return { ok: false, status: 403, reason: LOST_ACCESS.notMember };
    return { ok: false, status: 410, reason: LOST_ACCESS.replaced, closeCode: AppCloseCode.replaced };
  }
  const doc = isUuid(room) ? facts.docs.get(id) : undefined;
  if (!doc) return { ok: false, status: 404, reason: LOST_ACCESS.gone, closeCode: AppCloseCode.deleted };
  const role = facts.roles.get(doc.studyId);
  if (!role) return { ok: false, status: 403, reason: LOST_ACCESS.notMember };
  // Rounds narrow the role table per document (an independent phase); `reason` says why in plain words.
  const access = documentAccess(role, doc, session.user.id, facts.rounds.get(key(doc))!, facts.supervision.get(doc.textId ?? '')!);
  if (!access.read) return { ok: false, status: 403, reason: access.reason ?? LOST_ACCESS.mayNotRead };
  // A rebuilt room refuses structs of the documents it replaced: an old copy must not bring the originals back.
  const retiredClients = facts.retiredClients.get(doc.id) ?? [];
  const memoView = doc.kind === 'memos' ? facts.memoViews.get(doc.studyId) : undefined;
  return {
    ok: true,
    viewed: doc.kind === 'layer' && doc.coderId !== session.user.id ? { coderId: doc.coderId, textId: doc.textId } : null,
    grant: {
      // The stored id, not the URL's spelling: `/sync/<UPPER-CASE-ID>` joins the same room.
      room: doc.id,
      docId: doc.id,
      studyId: doc.studyId,
      kind: doc.kind,
      userId: session.user.id,
      userName: session.user.name,
      sessionId: session.sessionId,
      sessionExpiresAt: session.expiresAt,
      role,
      canWrite: access.write || access.writeRule !== undefined,
      ...(access.writeRule ? { writeRule: access.writeRule } : {}),
      hidePointing: access.hidePointing,
      // the memos document is study-wide: which of its entries this reader receives (memo-view.ts)
      ...(memoView ? { memoView } : {}),
      ...(retiredClients.length > 0 ? { retiredClients } : {}),
    },
  };
}

/** The `ticket` query parameter of a sync URL, or null. */
function ticketOf(url: string | undefined): string | null {
  const q = url?.indexOf('?') ?? -1;
  if (q < 0) return null;
  const value = new URLSearchParams(url!.slice(q + 1)).get('ticket');
  return value && /^[A-Za-z0-9_-]{20,100}$/.test(value) ? value : null;
}
