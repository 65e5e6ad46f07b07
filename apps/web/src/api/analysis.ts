/** The analysis and exchange endpoints (retrieval, tables, exports, REFI-QDA imports) as the web app uses them. */
import { ApiError, NetworkError } from './errors.js';

const enc = encodeURIComponent;

async function getJson<T>(path: string): Promise<T> {
  let res: Response;
  try {
    res = await fetch(path, { credentials: 'same-origin', headers: { accept: 'application/json' } });
  } catch (err) {
    throw new NetworkError(err);
  }
  const body = (await res.json().catch(() => null)) as { error?: { code?: string; message?: string } } | null;
  if (!res.ok) throw new ApiError(body?.error?.code ?? 'http_' + res.status, body?.error?.message ?? res.statusText, res.status);
  return body as T;
}

export interface Head {
  id: string;
  label: string;
  colour?: string;
  cases?: number;
}

export interface TableOut {
  kind: 'frequency' | 'cooccurrence' | 'code-by-attribute' | 'case-by-code';
  rows: Head[];
  cols: Head[];
  cells: number[][];
  caution: string;
  attributes: Array<{ id: string; name: string }>;
  cases: Array<{ id: string; name: string }>;
  coders: Array<{ id: string; name: string }>;
  texts: Array<{ id: string; title: string }>;
  speakers: string[];
  /** Rounds whose layers the caller may read; `consensus`: its consensus layer is readable (revealed or closed). */
  rounds: Array<{ number: number; name: string; phase: string; consensus: boolean }>;
  mode?: string;
  count?: string;
  attribute?: string;
}

export interface RetrievedSegment {
  id: string;
  textId: string;
  textTitle: string;
  coderId: string | null;
  coderName: string;
  /** consensus: a round's consensus layer (no coder). */
  kind: 'coder' | 'consensus';
  codeId: string;
  codeLabel: string;
  start: number;
  end: number;
  quote: string;
  speaker: string | null;
  round: number | null;
  note: string | null;
  createdAt: string;
  context: { before: string; after: string; clippedBefore: boolean; clippedAfter: boolean } | null;
}

export interface Retrieval {
  total: number;
  offset: number;
  limit: number;
  items: RetrievedSegment[];
}

export type Query = Record<string, string | number | boolean | undefined>;

const qs = (q: Query) =>
  Object.entries(q)
    .filter(([, v]) => v !== undefined && v !== '' && v !== false)
    .map(([k, v]) => `${enc(k)}=${enc(String(v))}`)
    .join('&');

export interface ImportReport {
  studyId: string;
  created: boolean;
  texts: number;
  codes: number;
  segments: number;
  memos: number;
  cases: number;
  endReading: 'exclusive' | 'inclusive';
  warnings: string[];
  coders: Array<{ name: string; email: string; account: string }>;
}

export interface Losses {
  export: { qdc: string[]; qdpx: string[] };
  import: { qdc: string[]; qdpx: string[] };
}

export const analysisApi = {
  table: (studyId: string, q: Query) => getJson<TableOut>(`/api/studies/${enc(studyId)}/tables?${qs(q)}`),
  retrieve: (studyId: string, q: Query) => getJson<Retrieval>(`/api/studies/${enc(studyId)}/retrieval?${qs(q)}`),
  losses: () => getJson<Losses>('/api/exchange/losses'),
  /** Streams an export, reporting bytes received; resolves with the file as a Blob and its name. */
  async download(studyId: string, format: string, onBytes: (n: number) => void, layers?: 'consensus'): Promise<{ blob: Blob; filename: string }> {
    let res: Response;
    try {
      res = await fetch(`/api/studies/${enc(studyId)}/export?format=${enc(format)}${layers ? `&layers=${layers}` : ''}`, { credentials: 'same-origin' });
    } catch (err) {
      throw new NetworkError(err);
    }
    if (!res.ok || !res.body) {
      const body = (await res.json().catch(() => null)) as { error?: { code?: string; message?: string } } | null;
      throw new ApiError(body?.error?.code ?? 'http_' + res.status, body?.error?.message ?? res.statusText, res.status);
    }
    const reader = res.body.getReader();
    const parts: Uint8Array[] = [];
    let n = 0;
    for (;;) {
      const { done, value } = await reader.read();
      if (done) break;
      parts.push(value);
      n += value.byteLength;
      onBytes(n);
    }
    const filename = /filename="([^"]+)"/.exec(res.headers.get('content-disposition') ?? '')?.[1] ?? `export.${format}`;
    return { blob: new Blob(parts as BlobPart[], { type: res.headers.get('content-type') ?? 'application/octet-stream' }), filename };
  },
  async importFile(path: string, file: File): Promise<ImportReport> {
    let res: Response;
    try {
      res = await fetch(path, { method: 'POST', credentials: 'same-origin', headers: { 'content-type': 'application/octet-stream', accept: 'application/json' }, body: file });
    } catch (err) {
      throw new NetworkError(err);
    }
    const body = (await res.json().catch(() => null)) as (ImportReport & { error?: { code?: string; message?: string } }) | null;
    if (!res.ok) throw new ApiError(body?.error?.code ?? 'http_' + res.status, body?.error?.message ?? res.statusText, res.status);
    return body as ImportReport;
  },
  importInto: (studyId: string, format: 'qdc' | 'qdpx', file: File) => analysisApi.importFile(`/api/studies/${enc(studyId)}/import?format=${format}`, file),
  importNew: (title: string, format: 'qdc' | 'qdpx', file: File) => analysisApi.importFile(`/api/studies/import?format=${format}&title=${enc(title)}`, file),
};
