// The demo study's files against their contract (demo/README.md). The contract is ours; the codebook
// fields follow MacQueen, McLellan, Kay & Milstein (1998) and code types DeCuir-Gunby, Marshall &
// McCulloch (2011), as DESIGN.md §3 cites them. Word counts use whitespace tokens (common practice).
import { describe, expect, it } from 'vitest';
import { loadDemo } from '../../demo/load.js';
import { checkDemo, countWords, parseTurns, type DemoBundle } from '../../demo/verify.js';

const demo = loadDemo();
const clone = (): DemoBundle => structuredClone(demo);
const codes = (r: ReturnType<typeof checkDemo>) => r.problems.map((p) => p.code);

describe('demo study as shipped', () => {
  const report = checkDemo(demo);

  it('passes every check', () => {
    expect(report.problems).toEqual([]);
  });

  it('has four transcripts of at least 1,600 words, one per participant P01-P04', () => {
    expect(Object.keys(demo.texts)).toHaveLength(4);
    for (const n of Object.values(report.wordCounts)) expect(n).toBeGreaterThanOrEqual(1600);
    const mains = Object.values(demo.texts).map((t) => [...new Set(parseTurns(t).map((x) => x!.speaker))].filter((s) => /^P\d\d$/.test(s)));
    expect(mains.flat().sort()).toEqual(['P01', 'P02', 'P03', 'P04']);
  });

  it('has 14-18 codes, each example and near-miss found verbatim in a text', () => {
    const cb = demo.codebook as Array<{ examples: string[]; nearMisses: string[] }>;
    expect(cb.length).toBeGreaterThanOrEqual(14);
    expect(cb.length).toBeLessThanOrEqual(18);
    const all = Object.values(demo.texts).join('\n');
    for (const c of cb) for (const q of [...c.examples, ...c.nearMisses]) expect(all).toContain(q);
  });
});

describe('the checker catches broken demo data', () => {
  it('counts words as whitespace tokens, ignoring lone dashes and bracketed notes', () => {
    expect(countWords('Well — I do. [laughs] Right. [long pause]')).toBe(4);
  });

  it('reports a quote that is not verbatim', () => {
    const b = clone();
    (b.codebook as Array<{ examples: string[] }>)[0]!.examples.push('A sentence nobody said.');
    expect(codes(checkDemo(b))).toContain('quote-not-verbatim');
  });

  it('reports a short text, a malformed turn and a timestamp going backwards', () => {
    const b = clone();
    b.texts['p01-beacon-projection.txt'] = '[00:00:05] I: Hello.\n\n[00:00:03] P01: Hi there.\n\nno stamp here';
    const c = codes(checkDemo(b));
    expect(c).toEqual(expect.arrayContaining(['too-short', 'timestamp-order', 'turn-format']));
  });

  it('reports a speaker who is not among the text\'s cases', () => {
    const b = clone();
    const entry = (b.index as Array<{ file: string; cases: string[] }>).find((e) => e.file.startsWith('p02'))!;
    entry.cases = entry.cases.filter((c) => c !== 'P02b');
    expect(codes(checkDemo(b))).toContain('speaker-not-case');
  });

  it('reports an unknown parent, an unknown code in a group, and an exclusive set no turn can show', () => {
    const b = clone();
    (b.codebook as Array<{ parent: string | null }>)[0]!.parent = 'c-nothing';
    (b.groups as { themes: Array<{ codeIds: string[] }> }).themes[0]!.codeIds.push('c-missing');
    (b.groups as { exclusiveSets: unknown[] }).exclusiveSets.push({ id: 'x-t', label: 't', codeIds: ['c-belonging', 'c-money'] });
    expect(codes(checkDemo(b))).toEqual(expect.arrayContaining(['bad-parent', 'unknown-code', 'exclusive-demo']));
  });

  it('reports accounts off example.org, short passwords and missing roles', () => {
    const b = clone();
    b.accounts = [{ email: 'lead@gmail.test', password: 'demo', role: 'lead', name: 'X' }];
    const c = checkDemo(b).problems.filter((p) => p.where === 'accounts.json').map((p) => p.message);
    expect(c.some((m) => m.includes('example.org'))).toBe(true);
    expect(c.some((m) => m.includes('shorter than 12'))).toBe(true);
    expect(c.some((m) => m.includes('need at least 1 owner'))).toBe(true);
  });

  it('reports case values that break their attribute type and memos that attach nowhere', () => {
    const b = clone();
    const cs = b.cases as { cases: Array<{ values: Record<string, unknown> }> };
    cs.cases[0]!.values['a-years'] = 'fourteen';
    (b.memos as Array<{ attachTo: unknown }>)[0]!.attachTo = { kind: 'code', ref: 'c-nothing' };
    expect(codes(checkDemo(b))).toEqual(expect.arrayContaining(['case-value', 'memo-target']));
  });
});
