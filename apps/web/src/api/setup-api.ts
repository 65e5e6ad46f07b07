/**
 * API calls of a study's life outside coding: first run, studies' settings, people (invitations,
 * passwords), uploads with preview, named versions and the audit log. Answers are typed here; the
 * server's shapes are in its OpenAPI description.
 */
import { call } from './client.js';
import { ApiError, NetworkError } from './errors.js';
import type { Role } from './types.js';

const enc = encodeURIComponent;

export type StudyMode = 'standard' | 'reflexive';
export interface StudySettings {
  id: string;
  title: string;
  description: string;
  mode: StudyMode;
  role: Role;
  retentionUntil: string | null;
  ethicsNote: string;
  archivedAt: string | null;
  permissions: string[];
}
export interface NewStudy { title: string; description: string; mode: StudyMode; retentionUntil: string | null; ethicsNote: string }
export interface Link { token: string; path: string; expiresAt: string }
export interface Invitation { id: string; email: string; role: Role; createdAt: string; expiresAt: string; expired: boolean }
export interface InvitationInfo { email: string; role: Role; studyId: string; studyTitle: string; expiresAt: string; accountExists: boolean }
export interface Preview {
  filename: string;
  format: string;
  title: string;
  turnCount: number;
  wordCount: number;
  speakers: Array<{ label: string; turns: number; words: number }>;
  unlabelledTurns: number;
  timestamps: { firstMs: number; lastMs: number } | null;
  turns: Array<{ speaker: string | null; startMs: number | null; endMs: number | null; text: string }>;
}
export interface ImportedText { id: string; title: string; room: string; sourceFormat: string; wordCount: number }
export interface VersionSummary { id: string; name: string; createdAt: string; createdBy: { id: string; name: string } | null }
export interface VersionDetail {
  version: VersionSummary;
  kind: 'text' | 'codebook';
  then: { text?: string; codes?: Array<{ id: string; label: string; definition?: string; [k: string]: unknown }> };
  comparison: { text?: { added: Array<{ at: number; text: string }>; removed: Array<{ at: number; text: string }>; wordsAdded: number; wordsRemoved: number } };
}
export interface AuditEntry { id: number; at: string; userId: string | null; userName: string | null; action: string; target: string | null; detail: Record<string, unknown> | null }

/** A file-upload error the importer located: shown beside that file. */
export class ImportRefusal extends Error {
  constructor(readonly code: string, message: string, readonly line: number | null, readonly column: number | null) {
    super(message);
    this.name = 'ImportRefusal';
  }
}

function refusal(body: unknown, status: number): Error {
  const e = (body as { error?: { code?: string; message?: string; details?: { line?: number | null; column?: number | null } } } | null)?.error;
  if (e?.details && 'line' in e.details) return new ImportRefusal(e.code ?? 'import_failed', e.message ?? 'The file could not be read.', e.details.line ?? null, e.details.column ?? null);
  return new ApiError(e?.code ?? `http_${status}`, e?.message ?? `The server answered ${status}.`, status);
}

async function sendFile(path: string, file: File, accept: string): Promise<Response> {
  const form = new FormData();
  form.append('file', file, file.name);
  try {
    return await fetch(path, { method: 'POST', body: form, credentials: 'same-origin', headers: { accept } });
  } catch (err) {
    throw new NetworkError(err);
  }
}

export const setupApi = {
  setupNeeded: async (): Promise<boolean> => ((await call('GET', '/api/setup')) as { needed: boolean }).needed,
  setup: async (body: { code: string; email: string; name: string; password: string }): Promise<void> => void (await call('POST', '/api/setup', body)),

  createStudy: async (body: NewStudy): Promise<StudySettings> => (await call('POST', '/api/studies', body)) as StudySettings,
  studySettings: async (id: string): Promise<StudySettings> => (await call('GET', `/api/studies/${enc(id)}`)) as StudySettings,
  updateStudy: async (id: string, body: Partial<NewStudy> & { archived?: boolean }): Promise<StudySettings> =>
    (await call('PATCH', `/api/studies/${enc(id)}`, body)) as StudySettings,
  deleteStudy: async (id: string): Promise<void> => void (await call('DELETE', `/api/studies/${enc(id)}`)),
  deleteText: async (id: string): Promise<void> => void (await call('DELETE', `/api/texts/${enc(id)}`)),
  allStudies: async (): Promise<Array<{ id: string; title: string; role: Role; mode: StudyMode; archivedAt: string | null; description: string }>> =>
    (await call('GET', '/api/studies')) as never,

  invitations: async (studyId: string): Promise<Invitation[]> => (await call('GET', `/api/studies/${enc(studyId)}/invitations`)) as Invitation[],
  invite: async (studyId: string, email: string, role: Role): Promise<Link & { email: string; role: Role }> =>
    (await call('POST', `/api/studies/${enc(studyId)}/invitations`, { email, role })) as never,
  withdraw: async (studyId: string, id: string): Promise<void> => void (await call('DELETE', `/api/studies/${enc(studyId)}/invitations/${enc(id)}`)),
  invitation: async (token: string): Promise<InvitationInfo> => (await call('GET', `/api/invitations/${enc(token)}`)) as InvitationInfo,
  accept: async (token: string, body: { name?: string; password: string }): Promise<{ studyId: string; role: Role }> =>
    (await call('POST', `/api/invitations/${enc(token)}/accept`, body)) as never,
  resetLink: async (studyId: string, userId: string): Promise<Link & { email: string }> =>
    (await call('POST', `/api/studies/${enc(studyId)}/members/${enc(userId)}/reset-link`)) as never,
  resetInfo: async (token: string): Promise<{ email: string; expiresAt: string }> => (await call('GET', `/api/password-resets/${enc(token)}`)) as never,
  resetPassword: async (token: string, password: string): Promise<void> => void (await call('POST', `/api/password-resets/${enc(token)}`, { password })),
  changePassword: async (currentPassword: string, newPassword: string): Promise<void> =>
    void (await call('PUT', '/api/me/password', { currentPassword, newPassword })),

  preview: async (studyId: string, file: File): Promise<Preview> => {
    const res = await sendFile(`/api/studies/${enc(studyId)}/texts/import/preview`, file, 'application/json');
    const body = (await res.json().catch(() => null)) as unknown;
    if (!res.ok) throw refusal(body, res.status);
    return body as Preview;
  },
  /** Imports one file, reporting progress (0..1) from the server's NDJSON stream; the text, or a located refusal. */
  importFile: async (studyId: string, file: File, onProgress: (f: number) => void): Promise<ImportedText> => {
    const res = await sendFile(`/api/studies/${enc(studyId)}/texts/import`, file, 'application/x-ndjson');
    if (!res.ok || !res.body) throw refusal(await res.json().catch(() => null), res.status);
    const reader = res.body.pipeThrough(new TextDecoderStream()).getReader();
    let buffered = '';
    for (;;) {
      const { value, done } = await reader.read();
      if (value) buffered += value;
      let nl: number;
      while ((nl = buffered.indexOf('\n')) >= 0) {
        const line = buffered.slice(0, nl).trim();
        buffered = buffered.slice(nl + 1);
        if (!line) continue;
        const msg = JSON.parse(line) as { progress?: number; text?: ImportedText; error?: unknown };
        if (typeof msg.progress === 'number') onProgress(msg.progress);
        if (msg.text) return msg.text;
        if (msg.error) throw refusal(msg, 422);
      }
      if (done) throw new ApiError('bad_response', 'The import stream ended without a result; check the texts list before trying again.', 0);
    }
  },

  versions: async (room: string): Promise<VersionSummary[]> => (await call('GET', `/api/documents/${enc(room)}/versions`)) as VersionSummary[],
  nameVersion: async (room: string, name: string): Promise<VersionSummary> => (await call('POST', `/api/documents/${enc(room)}/versions`, { name })) as VersionSummary,
  version: async (room: string, id: string): Promise<VersionDetail> => (await call('GET', `/api/documents/${enc(room)}/versions/${enc(id)}`)) as VersionDetail,

  audit: async (studyId: string, q: { action?: string; userId?: string; from?: string; to?: string; before?: number; limit?: number }): Promise<AuditEntry[]> => {
    const params = new URLSearchParams();
    for (const [k, v] of Object.entries(q)) if (v !== undefined && v !== '') params.set(k, String(v));
    return (await call('GET', `/api/studies/${enc(studyId)}/audit?${params}`)) as AuditEntry[];
  },
};
