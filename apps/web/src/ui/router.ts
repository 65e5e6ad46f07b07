/** A small hash router: routes are plain data parsed from location.hash, so links work without a server rewrite. */
import { createMemo, createSignal, type Accessor } from 'solid-js';

export type Route =
  | { name: 'signin' }
  | { name: 'studies' }
  | { name: 'study'; studyId: string }
  | { name: 'coding'; studyId: string; textId: string; segmentId?: string; memoId?: string }
  | { name: 'codebook'; studyId: string; codeId?: string }
  | { name: 'memos'; studyId: string }
  | { name: 'members'; studyId: string }
  | { name: 'review'; studyId: string }
  | { name: 'supervision'; studyId: string }
  | { name: 'agreement'; studyId: string }
  | { name: 'rounds'; studyId: string }
  | { name: 'round'; studyId: string; roundId: string }
  | { name: 'round-text'; studyId: string; roundId: string; textId: string; at?: number }
  | { name: 'round-agreement'; studyId: string; roundId: string }
  | { name: 'round-report'; studyId: string; roundId: string }
  | { name: 'analysis'; studyId: string }
  | { name: 'settings'; studyId: string }
  | { name: 'upload'; studyId: string }
  | { name: 'cases'; studyId: string }
  | { name: 'versions'; studyId: string }
  | { name: 'audit'; studyId: string }
  | { name: 'deid'; studyId: string }
  | { name: 'account' }
  | { name: 'invite'; token: string }
  | { name: 'reset'; token: string };

/** Study screens named by one path word after the study id. */
const STUDY_PAGES = ['memos', 'members', 'review', 'supervision', 'settings', 'upload', 'cases', 'versions', 'audit', 'deid'] as const;

export function parseRoute(hash: string): Route {
  const p = hash.replace(/^#\/?/, '').split('/').filter(Boolean).map(decodeURIComponent);
  if (p[0] === 'signin') return { name: 'signin' };
  if (p[0] === 'account') return { name: 'account' };
  if (p[0] === 'invite' && p[1]) return { name: 'invite', token: p[1] };
  if (p[0] === 'reset' && p[1]) return { name: 'reset', token: p[1] };
  if (p[0] === 'study' && p[1]) {
    const studyId = p[1];
    if (p[2] === 'text' && p[3]) return { name: 'coding', studyId, textId: p[3], ...(p[4] === 'segment' && p[5] ? { segmentId: p[5] } : {}), ...(p[4] === 'jotting' && p[5] ? { memoId: p[5] } : {}) };
    if (p[2] === 'codebook') return { name: 'codebook', studyId, codeId: p[3] };
    if (p[2] === 'memos') return { name: 'memos', studyId };
    if (p[2] === 'members') return { name: 'members', studyId };
    if (p[2] === 'review') return { name: 'review', studyId };
    if (p[2] === 'agreement') return { name: 'agreement', studyId };
    if (p[2] === 'rounds') return { name: 'rounds', studyId };
    if (p[2] === 'round' && p[3]) {
      const roundId = p[3];
      if (p[4] === 'text' && p[5]) return { name: 'round-text', studyId, roundId, textId: p[5], ...(p[6] === 'at' && /^\d+$/.test(p[7] ?? '') ? { at: Number(p[7]) } : {}) };
      if (p[4] === 'agreement') return { name: 'round-agreement', studyId, roundId };
      if (p[4] === 'report') return { name: 'round-report', studyId, roundId };
      return { name: 'round', studyId, roundId };
    }
    if (p[2] === 'analysis') return { name: 'analysis', studyId };
    const page = STUDY_PAGES.find((x) => x === p[2]);
    if (page) return { name: page, studyId };
    return { name: 'study', studyId };
  }
  return { name: 'studies' };
}

export function href(r: Route): string {
  const e = encodeURIComponent;
  switch (r.name) {
    case 'signin': return '#/signin';
    case 'studies': return '#/';
    case 'study': return `#/study/${e(r.studyId)}`;
    case 'coding': return `#/study/${e(r.studyId)}/text/${e(r.textId)}${r.segmentId ? '/segment/' + e(r.segmentId) : r.memoId ? '/jotting/' + e(r.memoId) : ''}`;
    case 'codebook': return `#/study/${e(r.studyId)}/codebook${r.codeId ? '/' + e(r.codeId) : ''}`;
    case 'agreement': return `#/study/${e(r.studyId)}/agreement`;
    case 'rounds': return `#/study/${e(r.studyId)}/rounds`;
    case 'round': return `#/study/${e(r.studyId)}/round/${e(r.roundId)}`;
    case 'round-text': return `#/study/${e(r.studyId)}/round/${e(r.roundId)}/text/${e(r.textId)}${r.at !== undefined ? `/at/${r.at}` : ''}`;
    case 'round-agreement': return `#/study/${e(r.studyId)}/round/${e(r.roundId)}/agreement`;
    case 'round-report': return `#/study/${e(r.studyId)}/round/${e(r.roundId)}/report`;
    case 'analysis': return `#/study/${e(r.studyId)}/analysis`;
    case 'memos': case 'members': case 'review': case 'supervision': case 'settings': case 'upload': case 'cases': case 'versions': case 'audit': case 'deid':
      return `#/study/${e(r.studyId)}/${r.name}`;
    case 'account': return '#/account';
    case 'invite': return `#/invite/${e(r.token)}`;
    case 'reset': return `#/reset/${e(r.token)}`;
  }
}

const [route, setRoute] = createSignal<Route>(parseRoute(location.hash));
window.addEventListener('hashchange', () => setRoute(parseRoute(location.hash)));
export { route };
export function go(r: Route): void {
  location.hash = href(r);
}

/**
 * The current route of one kind, mapped, keeping its last value once the route has left that kind. A
 * screen under a `<Match>` reads this instead of the Match's accessor: when the route changes, the
 * screen's own computations may run once more before the Match disposes them, and reading a Match
 * accessor then throws ("Stale read from <Match>"), which stops the route change from rendering.
 */
export function lastWhile<K extends Route['name'], T>(name: K, first: T, pick: (r: Extract<Route, { name: K }>) => T): Accessor<T> {
  return createMemo<T>((prev) => {
    const r = route();
    return r.name === name ? pick(r as Extract<Route, { name: K }>) : prev;
  }, first);
}
