/** The supervision screen's calls (shapes as the server's OpenAPI describes them). */
import { call } from '../../api/client.js';

const enc = encodeURIComponent;

export type ReviewState = 'assigned' | 'returned' | 'accepted';
export interface Assignment {
  textId: string;
  textTitle: string;
  userId: string;
  userName: string;
  role: string;
  assignedAt: string;
  reviewState: ReviewState;
  reviewNote: string;
  reviewedAt: string | null;
  comparisonShared: boolean;
  reference: string | null;
}
export interface Settings {
  toleranceWords: number;
  driftThreshold: number;
}
export interface ProgressPoint {
  roundId: string;
  roundNumber: number;
  roundName: string;
  statistic: string;
  unit: string;
  value: number | null;
  counts: { matched: number; missed: number; extra: number; otherCode: number; otherBoundary: number };
  texts: number;
  drift: boolean;
  note?: string;
}
export interface Progress {
  mode: 'standard' | 'reflexive';
  trainees: Array<{ userId: string; name: string; points: ProgressPoint[] }>;
  settings: Settings;
  sources: string;
}

const base = (studyId: string) => `/api/studies/${enc(studyId)}`;
const one = (studyId: string, a: { textId: string; userId: string }) => `${base(studyId)}/assignments/${enc(a.textId)}/${enc(a.userId)}`;

export const supervisionApi = {
  assignments: async (studyId: string) => ((await call('GET', `${base(studyId)}/assignments`)) as { assignments: Assignment[] }).assignments,
  assign: async (studyId: string, textId: string, userId: string) => (await call('POST', `${base(studyId)}/assignments`, { textId, userId })) as Assignment,
  unassign: async (studyId: string, a: Assignment) => call('DELETE', one(studyId, a)),
  review: async (studyId: string, a: Assignment, state: ReviewState, note: string) => (await call('POST', `${one(studyId, a)}/review`, { state, note })) as Assignment,
  share: async (studyId: string, a: Assignment, shared: boolean) => (await call('POST', `${one(studyId, a)}/share`, { shared })) as Assignment,
  setReference: async (textId: string, layer: string | null) => (await call('PUT', `/api/texts/${enc(textId)}/reference`, { layer })) as { layer: string | null },
  settings: async (studyId: string) => (await call('GET', `${base(studyId)}/supervision/settings`)) as Settings,
  saveSettings: async (studyId: string, s: Settings) => (await call('PUT', `${base(studyId)}/supervision/settings`, s)) as Settings,
  progress: async (studyId: string) => (await call('GET', `${base(studyId)}/supervision/progress`)) as Progress,
};

export const STATE_WORDS: Record<ReviewState, string> = {
  assigned: 'Being coded',
  returned: 'Returned with feedback',
  accepted: 'Accepted',
};
