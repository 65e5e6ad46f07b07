/**
 * The opening request (`GET /api/texts/:id/opening`): the states of a text, its layers, the codebook and
 * the memos in one response, put into their documents before their sockets open (open-doc `prime`), and
 * the ticket those sockets present. Without it (offline, an older server) documents open as before:
 * from the offline copy and the sockets.
 */
import { decodeOpening } from '@gloss/model';
import { enc } from '../api/client.js';
import { prime, setSyncTicket } from './open-doc.js';

/** Fetches and primes; resolves with the rooms primed (empty when the request failed: sockets bring them). */
export async function openText(textId: string): Promise<string[]> {
  let bytes: Uint8Array;
  try {
    const res = await fetch(`/api/texts/${enc(textId)}/opening`, { credentials: 'same-origin', headers: { accept: 'application/octet-stream' } });
    if (!res.ok) return [];
    bytes = new Uint8Array(await res.arrayBuffer());
  } catch {
    return [];
  }
  performance.mark('gloss:opening-arrived');
  let opening;
  try {
    opening = decodeOpening(bytes);
  } catch (err) {
    console.warn('opening bundle unreadable; opening over the sockets instead', err);
    return [];
  }
  setSyncTicket(opening.ticket);
  const rooms: string[] = [];
  // each state is applied in a task of its own when its document opens (open-doc `prime`)
  for (const d of opening.docs) {
    prime(d.room, d.state);
    rooms.push(d.room);
  }
  return rooms;
}
