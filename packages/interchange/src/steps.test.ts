import { describe, expect, it } from 'vitest';
import { importPlainText, parsePlainText } from './plain-text.js';
import { importSrt } from './srt.js';
import { STEP_SIZE } from './steps.js';
import { importWebVtt } from './webvtt.js';

// Common practice for servers on one event loop: a long synchronous parse stalls every other
// client, so the async importers pause between steps. These tests show other work runs before the
// import finishes, and that pausing changes nothing in the result.
const enc = (s: string): Uint8Array => new TextEncoder().encode(s);

async function otherWorkRanDuring(run: (onProgress: (f: number) => void) => Promise<unknown>): Promise<boolean> {
  let otherWork = false;
  let ranBeforeEnd: boolean | null = null;
  setImmediate(() => (otherWork = true));
  await run((f) => {
    if (f === 1) ranBeforeEnd = otherWork;
  });
  return ranBeforeEnd === true;
}

describe('async imports let other work run', () => {
  const n = STEP_SIZE * 3;
  const text = Array.from({ length: n }, (_, i) => `${i % 2 ? 'I' : 'P1'}: turn ${i}`).join('\n');

  it('plain text: same turns as the synchronous parse, with pauses', async () => {
    let result: unknown;
    expect(await otherWorkRanDuring(async (onProgress) => (result = await importPlainText(enc(text), { onProgress })))).toBe(true);
    expect(result).toEqual(parsePlainText(text));
  });

  it('a small file also finishes, with or without pauses', async () => {
    expect((await importPlainText(enc('I: hi'))).turns).toHaveLength(1);
  });

  it('WebVTT and SRT', async () => {
    const stamp = (i: number, sep: string): string => `00:${String(Math.floor(i / 60) % 60).padStart(2, '0')}:${String(i % 60).padStart(2, '0')}${sep}000`;
    const vtt = 'WEBVTT\n\n' + Array.from({ length: n }, (_, i) => `${stamp(i, '.')} --> ${stamp(i, '.')}\ncue ${i}\n`).join('\n');
    const srt = Array.from({ length: n }, (_, i) => `${i + 1}\n${stamp(i, ',')} --> ${stamp(i, ',')}\ncue ${i}\n`).join('\n');
    expect(await otherWorkRanDuring((onProgress) => importWebVtt(enc(vtt), { onProgress }))).toBe(true);
    expect(await otherWorkRanDuring((onProgress) => importSrt(enc(srt), { onProgress }))).toBe(true);
  });
});
