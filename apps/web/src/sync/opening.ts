/**
 * The opening request (`GET /api/texts/:id/opening`): the states of a text, its layers, the codebook and
 * the memos in one response, put into their documents before their sockets open (open-doc `prime`), and
 * the ticket those sockets present. Without it (offline, an older server) documents open as before:
 * from the offline copy and the sockets.
 *
 * A second open on this device draws from the server's states kept here by the first (kept-states.ts)
 * before the request returns: they are primed at once, and the request sends their state vectors
 * (`sv`), so each comes back as only what changed since. A room kept for the text that the answer leaves
 * out is no longer given: its kept state is deleted and an open document of it withdrawn.
 */
import { decodeOpening, encodeStateVectors } from '@gloss/model';
import { enc } from '../api/client.js';
import { prime, setSyncTicket, withdraw } from './open-doc.js';
import { forgetKept, forgetKeptText, keepOpening, keptGeneration, readKept } from './kept-states.js';

function base64url(bytes: Uint8Array): string {
  let s = '';
  for (let i = 0; i < bytes.length; i++) s += String.fromCharCode(bytes[i]!);
  return btoa(s).replace(/\+/g, '-').replace(/\//g, '_').replace(/=+$/, '');
}

/** Fetches and primes; resolves with the rooms primed (from this device or the request; those kept only, when the request failed). */
export async function openText(textId: string): Promise<string[]> {
  const started = keptGeneration();
  const kept = await readKept(textId);
  const primedHere = [...kept.vectors.keys()];
  // the kept states go into their documents as soon as they are read, whatever the request does
  const keptApplied = kept.states.then((states) => {
    if (started !== keptGeneration()) return;
    for (const [room, updates] of states) if (kept.vectors.has(room)) for (const u of updates) prime(room, u, true);
  });
  let bytes: Uint8Array;
  try {
    const sv = base64url(encodeStateVectors(kept.vectors));
    const res = await fetch(`/api/texts/${enc(textId)}/opening?sv=${sv}`, { credentials: 'same-origin', headers: { accept: 'application/octet-stream' } });
    if (!res.ok) {
      // refused (signed out, no longer a member, the text gone): nothing kept of it may be shown
      if (res.status === 401 || res.status === 403 || res.status === 404) {
        await keptApplied;
        primedHere.forEach(withdraw);
        await forgetKeptText(textId);
        return primedHere;
      }
      return primedHere;
    }
    bytes = new Uint8Array(await res.arrayBuffer());
  } catch {
    return primedHere;
  }
  performance.mark('gloss:opening-arrived');
  let opening;
  try {
    opening = decodeOpening(bytes);
  } catch (err) {
    console.warn('opening bundle unreadable; opening over the sockets instead', err);
    return primedHere;
  }
  if (started !== keptGeneration()) return primedHere;
  setSyncTicket(opening.ticket);
  // what changed goes on top of what was kept
  await keptApplied;
  const given = new Set(opening.docs.map((d) => d.room));
  const revoked = primedHere.filter((room) => !given.has(room));
  revoked.forEach(withdraw);
  void forgetKept(revoked);
  const rooms: string[] = [...revoked];
  // each state is applied in a task of its own when its document opens (open-doc `prime`)
  for (const d of opening.docs) {
    // a difference against a copy that is not here (a version 1 answer is always whole)
    if (d.diff && !kept.vectors.has(d.room)) continue;
    prime(d.room, d.state);
    rooms.push(d.room);
  }
  void keepOpening(textId, opening.docs, started);
  return rooms;
}
