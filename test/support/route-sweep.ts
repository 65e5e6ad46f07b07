/**
 * Calling every GET route of the OpenAPI description as one person, for the wire scans (rounds,
 * trainees): each `{param}` is filled with every value given for it, each query of `queries[path]` is
 * tried (or none), and ZIP answers are unpacked so their files are scanned as written.
 */
import { readZip } from '../../packages/interchange/src/refi/zip-read.js';

export interface SweptAnswer {
  /** The route as the description names it, e.g. `/api/texts/{textId}/segments`. */
  path: string;
  /** What was asked: the filled path and its query. */
  url: string;
  status: number;
  /** The body, or each file of a ZIP body (fetch has already undone brotli or gzip). */
  parts: Uint8Array[];
}

export interface SweepPlan {
  spec: { paths: Record<string, { get?: unknown }> };
  values: Record<string, string[]>;
  queries?: Record<string, string[]>;
  /** Routes not called (open streams read elsewhere, links that need a secret). */
  skip?: readonly string[];
}

export async function* sweepGetRoutes(baseUrl: string, cookie: string, plan: SweepPlan): AsyncGenerator<SweptAnswer> {
  for (const [path, item] of Object.entries(plan.spec.paths)) {
    if (!item.get || plan.skip?.includes(path)) continue;
    const params = [...path.matchAll(/\{(\w+)\}/g)].map((m) => m[1]!);
    const missing = params.find((p) => plan.values[p] === undefined);
    if (missing) throw new Error(`no value for {${missing}} of ${path}: a new route needs one here`);
    let urls = [path];
    for (const p of params) urls = urls.flatMap((u) => plan.values[p]!.map((v) => u.replace(`{${p}}`, v)));
    for (const u of urls) {
      for (const q of plan.queries?.[path] ?? ['']) {
        const res = await fetch(`${baseUrl}${u}${q}`, { headers: { cookie, origin: baseUrl } });
        const bytes = new Uint8Array(await res.arrayBuffer());
        const parts = bytes[0] === 0x50 && bytes[1] === 0x4b ? [...readZip(bytes, () => true).values()] : [bytes];
        yield { path, url: `${u}${q}`, status: res.status, parts };
      }
    }
  }
}
