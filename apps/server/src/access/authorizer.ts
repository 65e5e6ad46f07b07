/**
 * RoomAuthorizer for the sync endpoint: at the WebSocket upgrade, check the Origin, the session
 * cookie, the room (a documents-table id) and the caller's role in the room's study.
 * Errors: 403 bad origin, 401 no valid session, 404 unknown room, 403 not a member / may not read.
 */
import type { IncomingMessage } from 'node:http';
import type { Db } from '@gloss/db';
import { isAllowedOrigin } from '../auth/origin.js';
import { readSessionToken } from '../auth/cookies.js';
import type { SessionService } from '../auth/sessions.js';
import { recordAudit } from '../admin/audit.js';
import { HttpError, forbidden, notFound, unauthenticated } from '../errors.js';
import type { RoomAuthorizer, RoomGrant } from '../sync/contracts.js';
import { findDocument, roleIn } from './membership.js';
import { roomAccess } from './policy.js';

export interface AuthorizerDeps {
  db: Db;
  sessions: SessionService;
  publicUrl: string | undefined;
}

export function createRoomAuthorizer({ db, sessions, publicUrl }: AuthorizerDeps): RoomAuthorizer {
  return {
    async authorize(req: IncomingMessage, room: string): Promise<RoomGrant> {
      const header = (name: string) => {
        const v = req.headers[name];
        return Array.isArray(v) ? v[0] : v;
      };
      if (!isAllowedOrigin({ origin: header('origin'), referer: header('referer'), host: header('host') }, publicUrl)) {
        throw new HttpError(403, 'bad_origin', 'This origin may not open sync connections.');
      }
      const token = readSessionToken(header('cookie'));
      const session = token ? await sessions.validate(token, { extend: false }) : null;
      if (!session) throw unauthenticated();

      const doc = await findDocument(db, room);
      if (!doc) throw notFound('Room');
      const role = await roleIn(db, doc.studyId, session.user.id);
      if (!role) throw forbidden('You are not a member of this study.');
      const access = roomAccess(role, doc, session.user.id);
      if (!access.read) throw forbidden();

      if (doc.kind === 'layer' && doc.coderId !== session.user.id) {
        // Who viewed whose layer is part of the access log (DESIGN §6).
        await recordAudit(db, {
          userId: session.user.id,
          studyId: doc.studyId,
          action: 'layer.view',
          target: doc.id,
          detail: { coderId: doc.coderId, textId: doc.textId },
        });
      }
      return {
        room,
        docId: doc.id,
        kind: doc.kind,
        userId: session.user.id,
        userName: session.user.name,
        role,
        canWrite: access.write,
      };
    },
  };
}
