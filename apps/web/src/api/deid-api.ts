/** De-identification calls (owner, lead) and the pseudonym key (owner). Shapes: the server's OpenAPI description. */
import { call, enc } from './client.js';
import { ApiError, NetworkError } from './errors.js';

/** `where`: 'texts' and the other places it was found (codebook, memos, segment notes, comments, text titles, study details, round names). */
export interface Candidate { original: string; kind: string; occurrences: number; textIds: string[]; where: string[]; context: string; suggestion: string }
export interface Scan { occurrences: number; byTable: Record<string, number>; tablesScanned: number }
export interface KeyEntry { kind: string; original: string; pseudonym: string; createdAt: string }

const base = (studyId: string) => `/api/studies/${enc(studyId)}`;

export const deidApi = {
  candidates: async (studyId: string, list: string[]): Promise<{ texts: Array<{ id: string; title: string }>; candidates: Candidate[] }> =>
    (await call('POST', `${base(studyId)}/deid/candidates`, { list })) as never,
  apply: async (studyId: string, replacements: Array<{ original: string; pseudonym: string; kind: string }>): Promise<{ occurrences: number; texts: number; segmentsMoved: number; elsewhere: { codebook: number; memos: number; notes: number; comments: number; titles: number; study: number; rounds: number; audit: number } }> =>
    (await call('POST', `${base(studyId)}/deid/apply`, { replacements })) as never,
  purge: async (studyId: string): Promise<{ texts: Array<{ textId: string }>; scan: Scan; keyEntries: number }> => (await call('POST', `${base(studyId)}/deid/purge`, {})) as never,
  scan: async (studyId: string): Promise<{ scan: Scan; keyEntries: number }> => (await call('GET', `${base(studyId)}/deid/scan`)) as never,
  key: async (studyId: string): Promise<{ entries: KeyEntry[]; exportedAt: string | null }> => (await call('GET', `${base(studyId)}/pseudonyms`)) as never,
  deleteKey: async (studyId: string): Promise<void> => void (await call('DELETE', `${base(studyId)}/pseudonyms`)),
  /** The key as CSV text (the server allows one export). */
  exportKey: async (studyId: string): Promise<string> => {
    let res: Response;
    try {
      res = await fetch(`${base(studyId)}/pseudonyms/export`, { method: 'POST', credentials: 'same-origin', headers: { 'content-type': 'application/json' }, body: '{}' });
    } catch (err) {
      throw new NetworkError(err);
    }
    if (!res.ok) {
      const e = ((await res.json().catch(() => null)) as { error?: { code?: string; message?: string } } | null)?.error;
      throw new ApiError(e?.code ?? `http_${res.status}`, e?.message ?? res.statusText, res.status);
    }
    return res.text();
  },
};
