/** Server-sent events in tests: read a response's event stream into an array as events arrive. */
export interface SseEvent {
  event: string;
  data: unknown;
}

/** Collects events (JSON data) from `res` into `events`; call the returned function to stop reading. */
export function collectEvents(res: Response, events: SseEvent[]): () => Promise<unknown> {
  const reader = res.body!.pipeThrough(new TextDecoderStream()).getReader();
  let buffer = '';
  void (async () => {
    for (;;) {
      const { done, value } = await reader.read().catch(() => ({ done: true, value: undefined }));
      if (done) return;
      buffer += value;
      let at: number;
      while ((at = buffer.indexOf('\n\n')) >= 0) {
        const block = buffer.slice(0, at);
        buffer = buffer.slice(at + 2);
        const event = /^event: ?(.*)$/m.exec(block)?.[1] ?? 'message';
        const data = /^data: ?(.*)$/m.exec(block)?.[1] ?? '';
        events.push({ event, data: data ? JSON.parse(data) : null });
      }
    }
  })();
  return () => reader.cancel().catch(() => undefined);
}
