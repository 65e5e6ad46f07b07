/**
 * A study as plain data, the one shape every exporter reads and every importer of whole projects
 * produces. No Yjs: the server turns documents into this (and this back into documents).
 * Offsets (`start`, `end`) are UTF-16 code units into the text's content, as JavaScript strings
 * count; exporters that need code points convert (see code-points.ts).
 */
export interface ExCoder {
  id: string;
  name: string;
  /** The account's email; a project file written by Gloss carries it as the user's id. */
  email: string;
}

export interface ExTurn {
  speaker: string | null;
  startMs: number | null;
  endMs: number | null;
  /** Offset of the turn's first character in the content. */
  start: number;
}

export interface ExText {
  id: string;
  title: string;
  content: string;
  turns: ExTurn[];
}

export interface ExSegment {
  id: string;
  textId: string;
  coderId: string;
  codeId: string;
  start: number;
  end: number;
  quote: string;
  createdAt: number;
  note?: string;
  round?: number;
}

export interface ExExample {
  textId: string;
  quote: string;
  segmentId?: string;
}

export interface ExChange {
  at: number;
  by: string;
  kind: string;
  field?: string;
  reason?: string;
  round: number;
  detail?: string;
}

export type ExCodeType = 'theory-driven' | 'data-driven' | 'structural';
export type ExCodeStatus = 'draft' | 'active' | 'merged' | 'retired';

export interface ExCode {
  id: string;
  label: string;
  parentId: string | null;
  colour: string;
  type: ExCodeType;
  status: ExCodeStatus;
  briefDefinition: string;
  fullDefinition: string;
  inclusion: string;
  exclusion: string;
  examples: ExExample[];
  nearMisses: ExExample[];
  mergedInto: string | null;
  inVivo: boolean;
  createdAt: number;
  history: ExChange[];
}

/** A named group of codes: a mutually exclusive set or a theme. */
export interface ExGroup {
  id: string;
  label: string;
  kind: 'exclusive' | 'theme';
  codeIds: string[];
}

export type ExAttributeType = 'text' | 'number' | 'date' | 'boolean' | 'choice';
export type ExValue = string | number | boolean | null;

export interface ExAttribute {
  id: string;
  name: string;
  type: ExAttributeType;
  choices?: string[];
}

export interface ExCase {
  id: string;
  name: string;
  kind: string;
  values: Record<string, ExValue>;
  textIds: string[];
}

export type ExAttachment =
  | { kind: 'study' }
  | { kind: 'text'; textId: string }
  | { kind: 'segment'; textId: string; segmentId: string }
  | { kind: 'code'; codeId: string };

export interface ExMemo {
  id: string;
  kind: 'memo' | 'jotting';
  /** A coder id (ExCoder.id) or, when the author is not known, their name as written. */
  author: string;
  title: string;
  body: string;
  attachedTo: ExAttachment;
  createdAt: number;
  updatedAt: number;
  /** The thread under it, oldest first (the memos Markdown lists them; REFI-QDA notes have no threads). */
  replies?: ExReply[];
}

export interface ExReply {
  id: string;
  author: string;
  body: string;
  createdAt: number;
}

/** Everything but the texts and their segments (those may be streamed text by text). */
export interface StudyFrame {
  title: string;
  description: string;
  coders: ExCoder[];
  codes: ExCode[];
  groups: ExGroup[];
  attributes: ExAttribute[];
  cases: ExCase[];
  memos: ExMemo[];
}

export interface TextWithSegments {
  text: ExText;
  segments: ExSegment[];
}

export interface StudyData extends StudyFrame {
  texts: ExText[];
  segments: ExSegment[];
}

/** Codes' paths ("Parent / Child") by id, for readers who cannot see the tree. */
export function codePaths(codes: readonly ExCode[]): Map<string, string> {
  const byId = new Map(codes.map((c) => [c.id, c]));
  const out = new Map<string, string>();
  const path = (id: string, seen: Set<string>): string => {
    const known = out.get(id);
    if (known !== undefined) return known;
    const c = byId.get(id);
    if (!c) return id;
    const p = c.parentId !== null && byId.has(c.parentId) && !seen.has(c.parentId) ? path(c.parentId, new Set(seen).add(id)) + ' / ' : '';
    const full = p + c.label;
    out.set(id, full);
    return full;
  };
  for (const c of codes) path(c.id, new Set([c.id]));
  return out;
}

/** Codes ordered parents before children (a cycle or missing parent puts the code at the top). */
export function parentsFirst(codes: readonly ExCode[]): ExCode[] {
  const byId = new Map(codes.map((c) => [c.id, c]));
  const done = new Set<string>();
  const out: ExCode[] = [];
  const visit = (c: ExCode, trail: Set<string>) => {
    if (done.has(c.id)) return;
    const parent = c.parentId === null ? undefined : byId.get(c.parentId);
    if (parent && !trail.has(parent.id)) visit(parent, new Set(trail).add(c.id));
    if (!done.has(c.id)) {
      done.add(c.id);
      out.push(c);
    }
  };
  for (const c of codes) visit(c, new Set([c.id]));
  return out;
}
