/**
 * One server-sent-events stream over a study channel (relay/study-channel.ts): `ready` first, then one
 * event per channel message that `render` turns into an SSE event. `render` runs when the message is
 * sent, not when the stream opened, so it applies the reader's rights as they are now; it answers
 * `'end'` to close the stream (the reader lost access) or `undefined` to skip the message.
 */
import type { Context } from 'hono';
import { streamSSE } from 'hono/streaming';
import type { StudyChannel } from '../relay/study-channel.js';

export interface SseEvent { event: string; data: string }

export function streamStudyChannel<E extends { studyId: string }>(
  c: Context,
  channel: StudyChannel<E>,
  studyId: string,
  render: (e: E) => Promise<SseEvent | 'end' | undefined>,
): Response {
  return streamSSE(c, async (stream) => {
    const queue: E[] = [];
    let wake: (() => void) | undefined;
    const stop = await channel.listen(studyId, (e) => {
      queue.push(e);
      wake?.();
    });
    stream.onAbort(() => wake?.());
    try {
      await stream.writeSSE({ event: 'ready', data: '{}' });
      while (!stream.aborted) {
        const e = queue.shift();
        if (e === undefined) {
          await new Promise<void>((r) => (wake = r));
          wake = undefined;
          continue;
        }
        const out = await render(e);
        if (out === 'end') break;
        if (out) await stream.writeSSE(out);
      }
    } finally {
      await stop();
    }
  });
}
