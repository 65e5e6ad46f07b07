/** Typed fetch client for the Gloss API. Cookies carry the session; errors become ApiError. */
import { ApiError, NetworkError } from './errors.js';
import * as n from './normalise.js';
import type { Me, Member, Role, Study, StudySummary, TextDetail, TextSummary } from './types.js';

/** One JSON call; every failure is an ApiError (the server's own code and words) or a NetworkError. */
export async function call(method: string, path: string, body?: unknown): Promise<unknown> {
  let res: Response;
  try {
    res = await fetch(path, {
      method,
      credentials: 'same-origin',
      headers: body === undefined ? { accept: 'application/json' } : { 'content-type': 'application/json', accept: 'application/json' },
      body: body === undefined ? undefined : JSON.stringify(body),
    });
  } catch (err) {
    throw new NetworkError(err);
  }
  const text = await res.text();
  let json: unknown = undefined;
  if (text) {
    try {
      json = JSON.parse(text);
    } catch {
      if (!res.ok) throw new ApiError('http_' + res.status, text.slice(0, 200) || res.statusText, res.status);
      throw new ApiError('bad_response', 'The server sent something that is not JSON.', res.status);
    }
  }
  if (!res.ok) {
    const e = (json as { error?: { code?: string; message?: string } } | undefined)?.error;
    throw new ApiError(e?.code ?? 'http_' + res.status, e?.message ?? res.statusText, res.status);
  }
  return json;
}

export const enc = encodeURIComponent;

export const api = {
  signIn: async (email: string, password: string): Promise<Me> => n.toMe(await call('POST', '/api/session', { email, password })),
  signOut: async (): Promise<void> => void (await call('DELETE', '/api/session')),
  me: async (): Promise<Me> => n.toMe(await call('GET', '/api/me')),
  studies: async (): Promise<StudySummary[]> => n.toList(await call('GET', '/api/studies'), n.toStudySummary, 'studies'),
  study: async (id: string): Promise<Study> => n.toStudy(await call('GET', `/api/studies/${enc(id)}`)),
  members: async (id: string): Promise<Member[]> => n.toList(await call('GET', `/api/studies/${enc(id)}/members`), n.toMember, 'members'),
  /** A current member's role changes (null); anyone else gets an invitation link to copy (the server never says whether the email has an account). */
  addMember: async (id: string, email: string, role: Role): Promise<{ path: string; expiresAt: string } | null> => {
    const j = (await call('POST', `/api/studies/${enc(id)}/members`, { email, role })) as { invited?: boolean; path?: unknown; expiresAt?: unknown } | null;
    return j?.invited && typeof j.path === 'string' && typeof j.expiresAt === 'string' ? { path: j.path, expiresAt: j.expiresAt } : null;
  },
  setRole: async (id: string, userId: string, role: Role): Promise<void> =>
    void (await call('PATCH', `/api/studies/${enc(id)}/members/${enc(userId)}`, { role })),
  removeMember: async (id: string, userId: string): Promise<void> =>
    void (await call('DELETE', `/api/studies/${enc(id)}/members/${enc(userId)}`)),
  texts: async (id: string): Promise<TextSummary[]> => n.toList(await call('GET', `/api/studies/${enc(id)}/texts`), n.toTextSummary, 'texts'),
  /** Every visible layer's segments on a text, resolved by the server: [{id, coderId, codeId, start, end, quote, flags}]. */
  textSegments: async (id: string): Promise<Array<{ id: string; coderId: string; codeId: string; quote: string; flags: string[] }>> =>
    n.toList(await call('GET', `/api/texts/${enc(id)}/segments`), (x) => x as { id: string; coderId: string; codeId: string; quote: string; flags: string[] }, 'segments'),
  text: async (id: string): Promise<TextDetail> => n.toTextDetail(await call('GET', `/api/texts/${enc(id)}`), id),
};
