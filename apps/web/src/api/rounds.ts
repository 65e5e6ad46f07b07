/**
 * Calibration rounds (issue 8): `POST/GET /api/studies/:id/rounds`, `GET /api/rounds/:id`, reveal, close,
 * the per-text "done" mark, the round's agreement (api/agreement.ts) and its report downloads.
 * Answers are reduced to the shapes below; extra fields from the server are ignored.
 */
import { call, enc } from './client.js';
import { ApiError } from './errors.js';
import { toLayer } from './normalise.js';
import type { LayerInfo } from './types.js';

export type Phase = 'independent' | 'revealed' | 'closed';
export const UNITS = ['turn', 'paragraph', 'sentence', 'span'] as const;

export interface ProgressCell {
  participantId: string;
  textId: string;
  /** Words of the text inside at least one of the participant's segments. */
  wordsCoded: number | null;
  /** Words of the text (the denominator of wordsCoded), when the server says. */
  words: number | null;
  /** Words of the speaker turns that have been on the participant's screen in the round's coding view. */
  wordsRead: number | null;
  segments: number;
  done: boolean;
}

export interface Round {
  id: string;
  studyId: string;
  /** 1 for the study's first round, and so on. */
  number: number | null;
  name: string;
  purpose: string;
  phase: Phase;
  unit: string;
  statistic: string;
  textIds: string[];
  texts: Array<{ id: string; title: string }>;
  participantIds: string[];
  participants: Array<{ id: string; name: string }>;
  /** Who started the round (its lead). */
  leadId: string | null;
  leadName: string;
  codebookVersionId: string | null;
  createdAt: string | null;
  /**
   * Per text (GET /api/rounds/:id only): its room and the round's layers the caller may open. A closed
   * round's layers are listed here only (a text's own entry lists the open round's).
   */
  rooms: Map<string, { room: string; layers: LayerInfo[] }>;
  /** The caller's part in it, as the server sees it. */
  me: { participant: boolean; canManage: boolean; done: string[] };
}

export interface NewRound {
  name: string;
  textIds: string[];
  participantIds: string[];
  unit: string;
  statistic: string;
  purpose?: string;
}

type Json = Record<string, unknown>;
const obj = (v: unknown): Json => (v && typeof v === 'object' ? (v as Json) : {});
const str = (v: unknown): string | undefined => (typeof v === 'string' ? v : typeof v === 'number' ? String(v) : undefined);
const ids = (v: unknown): string[] => (Array.isArray(v) ? v.map((x) => str(x) ?? str(obj(x).id) ?? str(obj(x).userId) ?? '').filter(Boolean) : []);
const named = (v: unknown): Array<{ id: string; name: string; title: string }> =>
  Array.isArray(v) ? v.map((x) => ({ id: str(x) ?? str(obj(x).id) ?? '', name: str(obj(x).name) ?? '', title: str(obj(x).title) ?? '' })).filter((x) => x.id) : [];
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function toProgress(v: unknown): ProgressCell {
  const j = obj(v);
  return {
    participantId: str(j.participantId ?? j.userId ?? j.coderId) ?? '',
    textId: str(j.textId) ?? '',
    wordsCoded: num(j.wordsCoded ?? j.codedWords),
    words: num(j.words ?? j.wordCount),
    wordsRead: num(j.wordsRead),
    segments: num(j.segments ?? j.segmentCount) ?? 0,
    done: j.done === true || typeof j.doneAt === 'string',
  };
}

export function toRound(v: unknown): Round {
  const j = obj(obj(v).round ?? v);
  const id = str(j.id);
  if (!id) throw new ApiError('bad_response', "The server's answer lacks the round's id.", 0);
  const phase = str(j.phase);
  const texts = named(j.texts).map(({ id, title }) => ({ id, title }));
  const participants = named(j.participants).map(({ id, name }) => ({ id, name }));
  const me = obj(j.me);
  return {
    id,
    studyId: str(j.studyId) ?? '',
    number: num(j.number),
    name: str(j.name) ?? '(unnamed round)',
    purpose: str(j.purpose) ?? '',
    phase: phase === 'revealed' || phase === 'closed' ? phase : 'independent',
    unit: str(j.unit) ?? 'turn',
    statistic: str(j.statistic) ?? 'krippendorff-alpha',
    textIds: texts.length ? texts.map((t) => t.id) : ids(j.textIds),
    texts,
    participantIds: participants.length ? participants.map((p) => p.id) : ids(j.participantIds),
    participants,
    leadId: str(obj(j.createdBy).id) ?? null,
    leadName: str(obj(j.createdBy).name) ?? '',
    codebookVersionId: str(j.codebookVersionId) ?? null,
    createdAt: str(j.createdAt) ?? null,
    me: { participant: me.participant === true, canManage: me.canManage === true, done: ids(me.done) },
    rooms: new Map(
      (Array.isArray(j.texts) ? j.texts : [])
        .map((t) => obj(t))
        .filter((t) => typeof t.room === 'string' && t.room && Array.isArray(t.layers))
        .map((t) => [str(t.id) ?? '', { room: str(t.room)!, layers: (t.layers as unknown[]).map(toLayer) }] as const),
    ),
  };
}

const list = (v: unknown): unknown[] => (Array.isArray(v) ? v : Array.isArray(obj(v).rounds) ? (obj(v).rounds as unknown[]) : []);

export const roundsApi = {
  list: async (studyId: string): Promise<Round[]> => list(await call('GET', `/api/studies/${enc(studyId)}/rounds`)).map(toRound),
  get: async (roundId: string): Promise<Round> => toRound(await call('GET', `/api/rounds/${enc(roundId)}`)),
  create: async (studyId: string, r: NewRound): Promise<Round> => toRound(await call('POST', `/api/studies/${enc(studyId)}/rounds`, r)),
  reveal: async (roundId: string): Promise<void> => void (await call('POST', `/api/rounds/${enc(roundId)}/reveal`)),
  close: async (roundId: string): Promise<void> => void (await call('POST', `/api/rounds/${enc(roundId)}/close`)),
  /** Per participant and text: words coded, segments, done (the lead sees all rows, a participant their own). */
  progress: async (roundId: string): Promise<ProgressCell[]> => {
    const j = obj(await call('GET', `/api/rounds/${enc(roundId)}/progress`));
    return Array.isArray(j.rows) ? j.rows.map(toProgress) : [];
  },
  markDone: async (roundId: string, textId: string, done: boolean): Promise<void> =>
    void (await call(done ? 'POST' : 'DELETE', `/api/rounds/${enc(roundId)}/texts/${enc(textId)}/done`)),
  /** Reports the words of a round text shown on screen so far (the server keeps the highest figure). */
  reportRead: async (roundId: string, textId: string, words: number): Promise<void> =>
    void (await call('PUT', `/api/rounds/${enc(roundId)}/texts/${enc(textId)}/read`, { words })),
  reportUrl: (roundId: string, format: 'md' | 'csv'): string => `/api/rounds/${enc(roundId)}/report?format=${format}`,
  report: async (roundId: string): Promise<string> => {
    const res = await fetch(`/api/rounds/${enc(roundId)}/report?format=md`, { credentials: 'same-origin' });
    const body = await res.text();
    if (!res.ok) {
      let message = res.statusText;
      try {
        message = (JSON.parse(body) as { error?: { message?: string } }).error?.message ?? message;
      } catch { /* not JSON: keep the status text */ }
      throw new ApiError('http_' + res.status, message, res.status);
    }
    return body;
  },
};
