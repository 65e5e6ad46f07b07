/**
 * Sync tickets: one authorisation for all of a page's sockets. The opening request
 * (`GET /api/texts/:id/opening`) decides every room of the page with the RoomAuthorizer and leaves
 * those grants here under a random ticket (256 bits, base64url) for a short while; each WebSocket
 * upgrade of that page presents the ticket (`/sync/<room>?ticket=…`) with its session cookie and gets
 * the grant already decided, without a session, role or document lookup.
 *
 * A ticket stands only while nothing it was decided from could have changed. Live access counts
 * every re-evaluation it starts on this node (`stamp`, the same counter an upgrade in flight uses);
 * a ticket remembers the count taken before its decisions and is not honoured once the count moved
 * (a member removed, a round revealed, a sign-out, the periodic sweep): the upgrade then decides
 * afresh, as without a ticket. A ticket never refuses anything; it only skips work. Tickets live in
 * the memory of the node that issued them, so another node simply decides afresh too.
 */
import { randomBytes } from 'node:crypto';
import type { RoomGrant } from '../sync/contracts.js';

export interface TicketBook {
  /** The live-access count now: take it before deciding the grants a ticket will carry. */
  stamp(): number;
  /** Leaves `grants` (all of one session) under a new ticket; returns it and when it stops counting. */
  issue(sessionId: string, grants: readonly RoomGrant[], stamp: number): { ticket: string; expiresAt: Date };
  /**
   * The grant of `room` under `ticket` for the session `sessionId`, if the ticket is known, unexpired,
   * of that session, names that room and nothing changed since its decisions; else null.
   */
  redeem(ticket: string, sessionId: string, room: string): RoomGrant | null;
  /** Tickets held (for tests and health). */
  size(): number;
}

interface Held {
  sessionId: string;
  grants: Map<string, RoomGrant>;
  stamp: number;
  expiresAt: number;
}

/** Long enough for a page's sockets to open one after another on a slow link, short enough to matter little. */
export const TICKET_TTL_MS = 30_000;
/** A page opens a few rooms; a bound keeps a flood of opening requests from growing memory without end. */
const MAX_TICKETS = 10_000;

export function createTicketBook(opts: { stamp: () => number; ttlMs?: number; now?: () => number }): TicketBook {
  const ttl = opts.ttlMs ?? TICKET_TTL_MS;
  const now = opts.now ?? Date.now;
  const held = new Map<string, Held>();

  function sweep(t: number): void {
    // Map order is insertion order and every ticket lives as long: expired ones are at the front.
    for (const [id, h] of held) {
      if (h.expiresAt > t && held.size < MAX_TICKETS) break;
      held.delete(id);
    }
  }

  return {
    stamp: opts.stamp,
    issue(sessionId, grants, stamp) {
      const t = now();
      sweep(t);
      const ticket = randomBytes(32).toString('base64url');
      // never longer than the session the grants were decided for
      const sessionEnd = Math.min(...grants.map((g) => g.sessionExpiresAt.getTime()));
      const expiresAt = Math.min(t + ttl, sessionEnd);
      held.set(ticket, { sessionId, grants: new Map(grants.map((g) => [g.room, g])), stamp, expiresAt });
      return { ticket, expiresAt: new Date(expiresAt) };
    },
    redeem(ticket, sessionId, room) {
      const h = held.get(ticket);
      if (!h) return null;
      if (now() >= h.expiresAt || h.stamp !== opts.stamp()) {
        held.delete(ticket);
        return null;
      }
      if (h.sessionId !== sessionId) return null;
      return h.grants.get(room.toLowerCase()) ?? null;
    },
    size: () => held.size,
  };
}
