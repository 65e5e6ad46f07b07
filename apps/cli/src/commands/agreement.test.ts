import { execFile } from 'node:child_process';
import { existsSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { PassThrough } from 'node:stream';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { fleiss1971Counts, fleiss1971Data, k2011C } from '../../../../packages/agreement/src/testdata/published.js';
import { agreementCommand } from './agreement.js';

// Expected values: Krippendorff (2011) ex. C (alpha), Cohen (1960) p.45 (kappa), Fleiss (1971) p.379
// (Fleiss kappa, z from R irr via statsmodels), Artstein & Poesio (2008) p.558 (pi, S), Krippendorff (2004)
// p.254 (unitizing alpha), lindanna/unitized_alpha (2016 family, provisional).
const ua2004 = [
  [225, 70, 0, 'c'], [370, 30, 0, 'c'], [220, 80, 1, 'c'], [355, 20, 1, 'c'], [400, 20, 1, 'c'],
  [180, 60, 0, 'k'], [300, 50, 0, 'k'], [180, 60, 1, 'k'], [300, 50, 1, 'k'],
].map(([b, l, c, v]) => ({ coder: String(c), value: v, start: b, end: (b as number) + (l as number) }));
const ua2016 = [['A', 'x', 0, 5], ['A', 'y', 10, 15], ['B', 'x', 1, 5], ['B', 'y', 10, 16], ['C', 'x', 0, 4], ['C', 'x', 10, 15]].map(
  ([coder, value, start, end]) => ({ coder, value, start, end }),
);

async function run(input: unknown, argv = ['--input', '-']): Promise<{ code: number; out: Record<string, any>; err: string }> {
  const stdin = new PassThrough();
  const stdout = new PassThrough();
  const stderr = new PassThrough();
  let out = '';
  let err = '';
  stdout.on('data', (c) => (out += c));
  stderr.on('data', (c) => (err += c));
  stdin.end(typeof input === 'string' ? input : JSON.stringify(input));
  const code = await agreementCommand(argv, { stdin, stdout, stderr });
  const lines = out.trim().split('\n');
  expect(lines).toHaveLength(1); // exactly one JSON object
  return { code, out: JSON.parse(lines[0]!), err };
}

describe('agreementCommand (in process, real streams)', () => {
  it('krippendorff-alpha, all four levels (Krippendorff 2011 ex. C: .743 .815 .849 .797)', async () => {
    const want = { nominal: 0.743421, ordinal: 0.815388, interval: 0.849107, ratio: 0.797403 };
    for (const [level, v] of Object.entries(want)) {
      const { code, out } = await run({ statistic: 'krippendorff-alpha', level, data: k2011C });
      expect(code).toBe(0);
      expect(out.statistic).toBe('krippendorff-alpha');
      expect(out.value).toBeCloseTo(v, 5);
      expect(out.n).toBe(40);
    }
  });
  it('krippendorff-alpha with a seeded bootstrap adds a ci that contains the value', async () => {
    const { out } = await run({ statistic: 'krippendorff-alpha', level: 'ordinal', data: k2011C, bootstrap: { replicates: 300, seed: 3 } });
    expect(out.ci[0]).toBeLessThanOrEqual(out.value);
    expect(out.ci[1]).toBeGreaterThanOrEqual(out.value);
  });
  it('cohen-kappa from a table: kappa .492, p_o .70, p_e .41, se (FCE 1969) .051 (Cohen 1960 p.45)', async () => {
    const { out } = await run({ statistic: 'cohen-kappa', table: [[88, 14, 18], [10, 40, 10], [2, 6, 12]] });
    expect(out).toMatchObject({ statistic: 'cohen-kappa', p_o: expect.closeTo(0.7, 10), p_e: expect.closeTo(0.41, 10) });
    expect(out.value).toBeCloseTo(0.4915, 4);
    expect(out.se).toBeCloseTo(0.051, 3);
    expect(out.ci).toHaveLength(2);
  });
  it('scott-pi, bennett-s and percent-agreement from a table (Artstein & Poesio 2008 p.558)', async () => {
    const t = [[20, 10], [20, 50]];
    expect((await run({ statistic: 'scott-pi', table: t })).out.value).toBeCloseTo(0.341, 3);
    expect((await run({ statistic: 'bennett-s', table: t })).out.value).toBeCloseTo(0.4, 3);
    expect((await run({ statistic: 'percent-agreement', table: t })).out.value).toBeCloseTo(0.7, 10);
  });
  it('cohen-kappa from two coder rows equals the table form', async () => {
    const { out } = await run({ statistic: 'cohen-kappa', data: [[0, 1, 0, 0, 0, 0, 0, 0, 1, 0], [1, 1, 1, 0, 0, 1, 0, 0, 0, 0]] });
    expect(out.value).toBeCloseTo(0.0909, 4); // Krippendorff 2011 ex. A data; value computed by the check-value author
  });
  it('percent-agreement from data: 0.800 pairable values, 0.8182 unit mean (Krippendorff 2004 p.230)', async () => {
    const { out } = await run({ statistic: 'percent-agreement', data: k2011C });
    expect(out.value).toBeCloseTo(0.8, 10);
    expect(out.convention).toBe('pairable-values');
    expect(out.other.value).toBeCloseTo(9 / 11, 10);
  });
  it('fleiss-kappa from counts and from data: .4302, z 17.65 (Fleiss 1971; R irr)', async () => {
    const a = (await run({ statistic: 'fleiss-kappa', counts: fleiss1971Counts })).out;
    expect(a.value).toBeCloseTo(0.4302445, 6);
    expect(a.z).toBeCloseTo(17.65183, 4);
    expect(a.perCategory).toHaveLength(5);
    expect((await run({ statistic: 'fleiss-kappa', data: fleiss1971Data })).out.value).toBeCloseTo(0.4302445, 6);
  });
  it('unitizing-alpha u1995 (Krippendorff 2004 p.254: .8587) and the 2016 variants (provisional values)', async () => {
    const a = (await run({ statistic: 'unitizing-alpha', variant: 'u1995', continuum: { start: 150, end: 450 }, units: ua2004 })).out;
    expect(Math.abs(a.value - 0.8591)).toBeLessThan(5e-4);
    expect(a.perCategory).toHaveLength(2);
    const c = { start: 0, end: 20 };
    const want = { u: 0.5836, 'binary-u': 0.8095, cu: 0.3269 };
    for (const [variant, v] of Object.entries(want))
      expect((await run({ statistic: 'unitizing-alpha', variant, continuum: c, units: ua2016 })).out.value).toBeCloseTo(v, 4);
    const k = (await run({ statistic: 'unitizing-alpha', variant: 'k-u', continuum: c, units: ua2016 })).out;
    expect(k.value.x).toBeCloseTo(0.3164, 4);
    expect(k.value.y).toBeCloseTo(0.3438, 4);
    const one = (await run({ statistic: 'unitizing-alpha', variant: 'k-u', continuum: c, units: ua2016, category: 'y' })).out;
    expect(one.value).toBeCloseTo(0.3438, 4);
  });
  it('undefined coefficient: value null with a reason, exit 0', async () => {
    const { code, out } = await run({ statistic: 'krippendorff-alpha', data: [[1, 1], [1, 1]] });
    expect(code).toBe(0);
    expect(out).toMatchObject({ value: null, reason: 'no-variation' });
  });
  it.each([
    ['not json', '{', 'invalid-json'],
    ['unknown statistic', { statistic: 'magic' }, 'invalid-input'],
    ['level misspelt', { statistic: 'krippendorff-alpha', level: 'nominl', data: [[1]] }, 'invalid-input'],
    ['ragged table', { statistic: 'cohen-kappa', table: [[1, 2], [3]] }, 'not-square'],
    ['neither table nor data', { statistic: 'scott-pi' }, 'invalid-input'],
    ['strings at interval level', { statistic: 'krippendorff-alpha', level: 'interval', data: [['a', 'b'], ['a', 'c']] }, 'not-numeric'],
    ['unequal raters', { statistic: 'fleiss-kappa', counts: [[1, 1], [3, 0]] }, 'unequal-raters'],
    ['overlapping spans', { statistic: 'unitizing-alpha', variant: 'u', continuum: { start: 0, end: 9 }, units: [{ coder: 'A', value: 'x', start: 0, end: 5 }, { coder: 'A', value: 'y', start: 3, end: 6 }] }, 'overlapping-units'],
    ['span outside', { statistic: 'unitizing-alpha', variant: 'u1995', continuum: { start: 0, end: 9 }, units: [{ coder: 'A', value: 'x', start: 5, end: 12 }] }, 'span-outside-continuum'],
  ])('bad input (%s): exit 2, JSON error %s', async (_name, input, code) => {
    const r = await run(input);
    expect(r.code).toBe(2);
    expect(r.out.error.code).toBe(code);
    expect(typeof r.out.error.message).toBe('string');
    expect(r.err).toContain('gloss agreement');
  });
  it('missing --input and unreadable file are usage errors (exit 2)', async () => {
    expect((await run('', [])).out.error.code).toBe('usage');
    expect((await run('', ['--input', '/nonexistent/file.json'])).out.error.code).toBe('input-unreadable');
  });
});

// The way outside scripts call it: `pnpm --silent gloss agreement --input FILE` from the repo root.
const root = fileURLToPath(new URL('../../../../', import.meta.url));
const hasMain = existsSync(join(root, 'apps/cli/src/main.ts'));
function spawnGloss(args: string[], stdin?: string): Promise<{ code: number; stdout: string }> {
  return new Promise((resolve) => {
    const child = execFile('pnpm', ['--silent', 'gloss', ...args], { cwd: root }, (error, stdout) =>
      resolve({ code: error ? ((error as { code?: number }).code ?? 1) : 0, stdout }),
    );
    if (stdin !== undefined) child.stdin!.end(stdin);
  });
}
describe.runIf(hasMain)('gloss agreement (spawned through pnpm)', () => {
  it('reads a file and prints one JSON object', async () => {
    const dir = mkdtempSync(join(tmpdir(), 'gloss-agreement-'));
    const file = join(dir, 'in.json');
    writeFileSync(file, JSON.stringify({ statistic: 'krippendorff-alpha', level: 'nominal', data: k2011C }));
    const r = await spawnGloss(['agreement', '--input', file]);
    expect(r.code).toBe(0);
    const out = JSON.parse(r.stdout.trim());
    expect(out.statistic).toBe('krippendorff-alpha');
    expect(out.value).toBeCloseTo(0.743421, 5); // Krippendorff 2011 ex. C
  }, 90_000); // pnpm, then tsx: a cold start of both took 5-6 s here under load
  it('reads stdin; bad input exits 2 with a JSON error', async () => {
    const ok = await spawnGloss(['agreement', '--input', '-'], JSON.stringify({ statistic: 'scott-pi', table: [[20, 10], [20, 50]] }));
    expect(JSON.parse(ok.stdout.trim()).value).toBeCloseTo(0.341, 3);
    const bad = await spawnGloss(['agreement', '--input', '-'], '{"statistic":"cohen-kappa","table":"x"}');
    expect(bad.code).toBe(2);
    expect(JSON.parse(bad.stdout.trim()).error.code).toBe('invalid-input');
  }, 90_000);
});
