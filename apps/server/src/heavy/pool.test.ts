/**
 * The heavy-work pool runs jobs in worker threads with the results, progress and typed errors of the
 * same jobs run in place, and stops a job at its time limit. Common practice (a worker pool's contract);
 * the agreement figures themselves are checked against published values in packages/agreement.
 */
import { ImportError } from '@gloss/interchange';
import { afterAll, describe, expect, it } from 'vitest';
import type { ReportInput } from '../agreement/report.js';
import { HeavyError } from './errors.js';
import { createHeavyPool, inlineHeavy } from './pool.js';

const text = 'We moved here for the work. Then the mill closed. Nobody left after that.';
const input: ReportInput = {
  unit: 'sentence',
  statistic: 'krippendorff-alpha',
  codes: ['work', 'loss'],
  coders: ['a', 'b'],
  texts: [
    {
      textId: 't1',
      textLength: text.length,
      text,
      units: [
        { start: 0, end: 27 },
        { start: 28, end: 48 },
        { start: 49, end: text.length },
      ],
      coders: ['a', 'b'],
      segments: [
        { coderId: 'a', codeId: 'work', start: 0, end: 10 },
        { coderId: 'b', codeId: 'work', start: 3, end: 20 },
        { coderId: 'a', codeId: 'loss', start: 30, end: 40 },
        { coderId: 'b', codeId: 'loss', start: 55, end: 60 },
      ],
    },
  ],
  bootstrap: { replicates: 200, seed: 7 },
};

describe('heavy-work pool', () => {
  const pool = createHeavyPool({ threads: 1, timeoutMs: 60_000, memoryMb: 256, maxQueue: 4 });
  afterAll(() => pool.close());

  it('gives the same report in a worker thread as in place', async () => {
    const inThread = await pool.run('agreement', input);
    const inPlace = await inlineHeavy().run('agreement', input);
    expect(inThread).toEqual(inPlace);
    expect(inThread.bootstrap).toBeDefined();
  }, 60_000);

  it('carries progress out of the thread and typed errors back as their own class', async () => {
    const seen: number[] = [];
    const transcript = await pool.run(
      'transcript',
      { upload: { filename: 'a.txt', bytes: new TextEncoder().encode('ANA: We moved here.\nBEN: For the work.\n') }, options: {} },
      { onProgress: (f) => seen.push(f) },
    );
    expect(transcript.turns.map((t) => t.speaker)).toEqual(['ANA', 'BEN']);
    expect(seen.at(-1)).toBe(1); // the importer's last word: done (options.ts)
    await expect(pool.run('transcript', { upload: { filename: 'a.docx', bytes: new Uint8Array([1, 2, 3]) }, options: {} })).rejects.toSatisfy(
      (err) => err instanceof ImportError && err.code === 'not_zip',
    );
  }, 60_000);

  it('stops a job at its time limit and says so in words', async () => {
    // 1 ms: the thread cannot even start its loader in that time, so the limit is always reached.
    const strict = createHeavyPool({ threads: 1, timeoutMs: 1, memoryMb: 256, maxQueue: 4 });
    try {
      await expect(strict.run('agreement', { ...input, bootstrap: { replicates: 10_000, seed: 1 } })).rejects.toSatisfy(
        (err) => err instanceof HeavyError && err.code === 'timed_out' && /took longer than/.test(err.message),
      );
    } finally {
      await strict.close();
    }
  }, 60_000);
});
