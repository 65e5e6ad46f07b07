// @vitest-environment jsdom
// Hash routes are plain data: every route parses back from the address it makes (round-trip).
import { describe, expect, it } from 'vitest';
import { href, parseRoute, type Route } from './router.js';

describe('router', () => {
  it('round-trips the round routes, with and without a place', () => {
    const routes: Route[] = [
      { name: 'rounds', studyId: 's1' },
      { name: 'round', studyId: 's1', roundId: 'r1' },
      { name: 'round-text', studyId: 's1', roundId: 'r1', textId: 't1' },
      { name: 'round-text', studyId: 's1', roundId: 'r1', textId: 't1', at: 120 },
      { name: 'round-agreement', studyId: 's1', roundId: 'r1' },
      { name: 'round-report', studyId: 's1', roundId: 'r1' },
      { name: 'agreement', studyId: 's1' },
      { name: 'coding', studyId: 's1', textId: 't1', segmentId: 'g1' },
      { name: 'coding', studyId: 's1', textId: 't1', memoId: 'm1' },
    ];
    for (const r of routes) expect(parseRoute(href(r))).toEqual(r);
  });

  it('ignores a malformed place', () => {
    expect(parseRoute('#/study/s1/round/r1/text/t1/at/x')).toEqual({ name: 'round-text', studyId: 's1', roundId: 'r1', textId: 't1' });
  });
});
