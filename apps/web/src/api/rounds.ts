/**
 * Calibration rounds (issue 8): `POST/GET /api/studies/:id/rounds`, `GET /api/rounds/:id`, reveal, close,
 * the per-text "done" mark, the round's agreement (api/agreement.ts) and its report downloads.
 * Answers are reduced to the shapes below; extra fields from the server are ignored.
 */
import { call, enc } from './client.js';
import { ApiError } from './errors.js';

export type Phase = 'independent' | 'revealed' | 'closed';
export const UNITS = ['turn', 'paragraph', 'sentence', 'span'] as const;

export interface ProgressCell {
  participantId: string;
  textId: string;
  /** Words of the text inside at least one of the participant's segments. */
  wordsCoded: number | null;
  /** Words of the text (the denominator of wordsCoded), when the server says. */
  words: number | null;
  segments: number;
  done: boolean;
}

export interface Round {
  id: string;
  studyId: string;
  name: string;
  purpose: string;
  phase: Phase;
  unit: string;
  statistic: string;
  textIds: string[];
  participantIds: string[];
  leadId: string | null;
  codebookVersion: string | null;
  createdAt: string | null;
  progress: ProgressCell[];
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
const num = (v: unknown): number | null => (typeof v === 'number' && Number.isFinite(v) ? v : null);

function toProgress(v: unknown): ProgressCell {
  const j = obj(v);
  return {
    participantId: str(j.participantId ?? j.userId ?? j.coderId) ?? '',
    textId: str(j.textId) ?? '',
    wordsCoded: num(j.wordsCoded ?? j.codedWords),
    words: num(j.words ?? j.wordCount),
    segments: num(j.segments ?? j.segmentCount) ?? 0,
    done: j.done === true || typeof j.doneAt === 'string',
  };
}

export function toRound(v: unknown): Round {
  const j = obj(obj(v).round ?? v);
  const id = str(j.id);
  if (!id) throw new ApiError('bad_response', "The server's answer lacks the round's id.", 0);
  const phase = str(j.phase);
  return {
    id,
    studyId: str(j.studyId) ?? '',
    name: str(j.name) ?? '(unnamed round)',
    purpose: str(j.purpose) ?? '',
    phase: phase === 'revealed' || phase === 'closed' ? phase : 'independent',
    unit: str(j.unit) ?? 'turn',
    statistic: str(j.statistic) ?? 'krippendorff-alpha',
    textIds: ids(j.textIds ?? j.texts),
    participantIds: ids(j.participantIds ?? j.participants),
    leadId: str(j.leadId ?? j.createdBy ?? obj(j.lead).id) ?? null,
    codebookVersion: str(j.codebookVersion ?? obj(j.codebookVersion).name ?? j.versionName) ?? null,
    createdAt: str(j.createdAt) ?? null,
    progress: Array.isArray(j.progress) ? j.progress.map(toProgress) : [],
  };
}

const list = (v: unknown): unknown[] => (Array.isArray(v) ? v : Array.isArray(obj(v).rounds) ? (obj(v).rounds as unknown[]) : []);

export const roundsApi = {
  list: async (studyId: string): Promise<Round[]> => list(await call('GET', `/api/studies/${enc(studyId)}/rounds`)).map(toRound),
  get: async (roundId: string): Promise<Round> => toRound(await call('GET', `/api/rounds/${enc(roundId)}`)),
  create: async (studyId: string, r: NewRound): Promise<Round> => toRound(await call('POST', `/api/studies/${enc(studyId)}/rounds`, r)),
  reveal: async (roundId: string): Promise<void> => void (await call('POST', `/api/rounds/${enc(roundId)}/reveal`)),
  close: async (roundId: string): Promise<void> => void (await call('POST', `/api/rounds/${enc(roundId)}/close`)),
  markDone: async (roundId: string, textId: string, done: boolean): Promise<void> =>
    void (await call(done ? 'POST' : 'DELETE', `/api/rounds/${enc(roundId)}/texts/${enc(textId)}/done`)),
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
