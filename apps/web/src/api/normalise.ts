/**
 * The server's JSON is checked and reduced to the shapes in types.ts here, so screens never guess.
 * Room names may come as `codebookRoom`, `codebook: {room}` or `rooms: {codebook}`: all are accepted.
 */
import type { LayerInfo, Me, Member, Role, Study, StudySummary, TextDetail, TextSummary } from './types.js';
import { ApiError } from './errors.js';

type Json = Record<string, unknown>;
const obj = (v: unknown): Json => (v && typeof v === 'object' ? (v as Json) : {});
const str = (v: unknown): string | undefined => (typeof v === 'string' ? v : typeof v === 'number' ? String(v) : undefined);

function need(v: unknown, what: string): string {
  const s = str(v);
  if (s === undefined) throw new ApiError('bad_response', `The server's answer lacks ${what}.`, 0);
  return s;
}

function roomOf(j: Json, kind: 'codebook' | 'memos'): string | undefined {
  return str(j[`${kind}Room`]) ?? str(obj(j[kind]).room) ?? str(obj(j.rooms)[kind]);
}

export function toMe(v: unknown): Me {
  const j = obj(obj(v).user ?? v);
  return { id: need(j.id, 'user id'), email: str(j.email) ?? '', name: str(j.name) ?? str(j.displayName) ?? str(j.email) ?? '' };
}

export function toStudySummary(v: unknown): StudySummary {
  const j = obj(v);
  return { ...j, id: need(j.id, 'study id'), title: str(j.title) ?? str(j.name) ?? '(untitled study)', role: str(j.role) as Role | undefined };
}

export function toStudy(v: unknown): Study {
  const j = obj(obj(v).study ?? v);
  const base = toStudySummary(j);
  return {
    ...base,
    codebookRoom: need(roomOf(j, 'codebook'), 'the codebook room'),
    memosRoom: need(roomOf(j, 'memos'), 'the memos room'),
    memosView: str(j.memosView),
    mode: str(j.mode),
    permissions: Array.isArray(j.permissions) ? j.permissions.filter((x): x is string => typeof x === 'string') : undefined,
  };
}

export function toMember(v: unknown): Member {
  const j = obj(v);
  const u = obj(j.user);
  return {
    userId: need(j.userId ?? u.id ?? j.id, 'member id'),
    name: str(j.name) ?? str(u.name) ?? str(j.email) ?? '',
    email: str(j.email) ?? str(u.email) ?? '',
    role: (str(j.role) ?? 'observer') as Role,
  };
}

export function toTextSummary(v: unknown): TextSummary {
  const j = obj(v);
  const progress = Array.isArray(j.progress)
    ? j.progress.map((p) => {
        const q = obj(p);
        return { coderId: str(q.coderId) ?? '', name: str(q.name), segments: Number(q.segments ?? q.count ?? 0) };
      })
    : undefined;
  return { id: need(j.id, 'text id'), title: str(j.title) ?? '(untitled text)', room: need(j.room, 'text room'), progress };
}

export function toLayer(v: unknown): LayerInfo {
  const j = obj(v);
  return {
    room: need(j.room, 'layer room'),
    // a consensus layer belongs to no coder: it gets a lane of its own
    coderId: j.kind === 'consensus' ? str(j.coderId) ?? `consensus:${str(j.room)}` : need(j.coderId ?? j.userId, 'layer coder'),
    name: str(j.name) ?? str(j.coderName),
    mine: typeof j.mine === 'boolean' ? j.mine : undefined,
    canWrite: typeof j.canWrite === 'boolean' ? j.canWrite : undefined,
    ...('round' in j ? { round: str(j.round) ?? null } : {}),
    ...(j.kind === 'coder' || j.kind === 'consensus' ? { kind: j.kind } : {}),
  };
}

export function toTextDetail(v: unknown, id: string): TextDetail {
  const j = obj(obj(v).text ?? v);
  const layers = Array.isArray(j.layers) ? j.layers.map(toLayer) : Array.isArray(obj(v).layers) ? (obj(v).layers as unknown[]).map(toLayer) : [];
  const r = j.round && typeof j.round === 'object' ? obj(j.round) : undefined;
  const round = r && str(r.id) ? { id: str(r.id)!, phase: str(r.phase) ?? '', participant: r.participant === true } : undefined;
  return { id: str(j.id) ?? id, title: str(j.title) ?? '', room: need(j.room ?? obj(v).room, 'text room'), layers, ...(round ? { round } : {}) };
}

export function toList<T>(v: unknown, each: (x: unknown) => T, key: string): T[] {
  const arr = Array.isArray(v) ? v : obj(v)[key];
  if (!Array.isArray(arr)) throw new ApiError('bad_response', `The server's answer is not a list of ${key}.`, 0);
  return arr.map(each);
}
