/** The body limit: bodies within it pass intact; a refused body is read to its end, within bounds, before the 413. */
import { Hono } from 'hono';
import { describe, expect, it } from 'vitest';
import { limitBody } from './body-limit.js';
import { onError } from './errors.js';

function app(max: number, discard = { maxBytes: 1024, timeoutMs: 2_000 }) {
  const a = new Hono();
  a.onError(onError(() => undefined));
  a.use('*', limitBody(max, discard));
  a.post('/', async (c) => c.text(await c.req.text()));
  return a;
}

/** A chunked body of `count` chunks that records how many were pulled; `stall` never ends it. */
function streamOf(count: number, chunk: string, stall = false) {
  const state = { pulled: 0 };
  const bytes = new TextEncoder().encode(chunk);
  const body = new ReadableStream<Uint8Array>({
    pull(controller) {
      if (state.pulled >= count) return stall ? new Promise<void>(() => undefined) : controller.close();
      state.pulled++;
      controller.enqueue(bytes);
    },
  });
  return { body, state };
}

const post = (a: Hono, body: BodyInit, headers: Record<string, string> = {}) =>
  a.request('/', { method: 'POST', body, headers, duplex: 'half' } as RequestInit);

describe('limitBody', () => {
  it('passes bodies within the limit through unchanged, declared or streamed', async () => {
    const a = app(10);
    const declared = await post(a, 'abcdefghij', { 'content-length': '10' });
    expect(await declared.text()).toBe('abcdefghij');
    const { body } = streamOf(5, 'ab');
    expect(await (await post(a, body)).text()).toBe('ababababab');
  });

  it('reads a refused streamed body to its end before answering 413', async () => {
    const { body, state } = streamOf(200, 'xxxx');
    const res = await post(app(10), body);
    expect(res.status).toBe(413);
    expect(((await res.json()) as { error: { code: string } }).error.code).toBe('body_too_large');
    expect(state.pulled).toBe(200);
    expect(res.headers.get('connection')).toBeNull();
  });

  it('stops reading past its own bounds and asks to close the connection', async () => {
    const endless = streamOf(10_000, 'x'.repeat(64));
    const big = await post(app(10, { maxBytes: 1024, timeoutMs: 60_000 }), endless.body);
    expect(big.status).toBe(413);
    expect(big.headers.get('connection')).toBe('close');
    expect(endless.state.pulled).toBeLessThan(10_000);

    const stalled = streamOf(3, 'xxxxxxxx', true);
    const slow = await post(app(10, { maxBytes: 1024, timeoutMs: 200 }), stalled.body);
    expect(slow.status).toBe(413);
    expect(slow.headers.get('connection')).toBe('close');
  });
});
