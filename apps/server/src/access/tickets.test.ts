/**
 * The ticket book (tickets.ts): a ticket stands for its own session and rooms, until it expires or
 * live access evaluates any change. Expected behaviour: the project's own rule (DEVELOPERS.md, "Access
 * follows the study live": nothing decided before an access change may stand after it).
 */
import { describe, expect, it } from 'vitest';
import type { RoomGrant } from '../sync/contracts.js';
import { createTicketBook } from './tickets.js';

const grant = (room: string, sessionExpiresAt = new Date(10_000_000)): RoomGrant => ({
  room, docId: room, studyId: 's', kind: 'layer', userId: 'u', userName: 'U', sessionId: 'sess', sessionExpiresAt, role: 'coder', canWrite: true,
});

describe('ticket book', () => {
  const setup = () => {
    const clock = { t: 1_000, stamp: 0 };
    const book = createTicketBook({ stamp: () => clock.stamp, ttlMs: 30_000, now: () => clock.t });
    return { clock, book };
  };

  it('gives the grant of a room it names, to the same session, in any casing', () => {
    const { book } = setup();
    const { ticket, expiresAt } = book.issue('sess', [grant('aa'), grant('bb')], 0);
    expect(expiresAt.getTime()).toBe(31_000);
    expect(book.redeem(ticket, 'sess', 'bb')?.room).toBe('bb');
    expect(book.redeem(ticket, 'sess', 'AA')?.room).toBe('aa');
    // several sockets of the page present the same ticket
    expect(book.redeem(ticket, 'sess', 'aa')?.room).toBe('aa');
    expect(book.redeem(ticket, 'sess', 'cc')).toBeNull();
    expect(book.redeem(ticket, 'other-session', 'aa')).toBeNull();
    expect(book.redeem('unknown', 'sess', 'aa')).toBeNull();
  });

  it('stops at its expiry, and never outlives the session it was decided for', () => {
    const { book, clock } = setup();
    const { ticket } = book.issue('sess', [grant('aa')], 0);
    clock.t = 30_999;
    expect(book.redeem(ticket, 'sess', 'aa')).not.toBeNull();
    clock.t = 31_000;
    expect(book.redeem(ticket, 'sess', 'aa')).toBeNull();
    const short = book.issue('sess', [grant('aa', new Date(32_000))], 0);
    expect(short.expiresAt.getTime()).toBe(32_000);
  });

  it('does not stand once live access evaluated a change after the stamp its decisions were taken at', () => {
    const { book, clock } = setup();
    const taken = book.stamp();
    clock.stamp++; // a change evaluated while the opening request was deciding
    const { ticket } = book.issue('sess', [grant('aa')], taken);
    expect(book.redeem(ticket, 'sess', 'aa')).toBeNull();
    const fresh = book.issue('sess', [grant('aa')], book.stamp());
    expect(book.redeem(fresh.ticket, 'sess', 'aa')).not.toBeNull();
    clock.stamp++;
    expect(book.redeem(fresh.ticket, 'sess', 'aa')).toBeNull();
    expect(book.size()).toBe(0);
  });
});
