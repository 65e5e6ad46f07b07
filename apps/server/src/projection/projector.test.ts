import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { createMemoryUpdateStore } from '../store/index.js';
import { createProjector } from './projector.js';
import { withProjection } from './with-projection.js';

// The scheduling alone: the projection step is a recorder here; the database writes are exercised by
// test/coding/projection.test.ts on PGlite and PostgreSQL.
function recorder(fail: (docId: string, n: number) => boolean = () => false) {
  const calls: string[] = [];
  let running = 0;
  let overlapped = false;
  return {
    calls,
    get overlapped() {
      return overlapped;
    },
    async project(docId: string) {
      if (running > 0) overlapped = true;
      running++;
      calls.push(docId);
      await new Promise((r) => setImmediate(r));
      running--;
      if (fail(docId, calls.length)) throw new Error(`cannot project ${docId}`);
    },
  };
}

const update = (text: string) => {
  const d = new Y.Doc();
  d.getText('text').insert(0, text);
  return Y.encodeStateAsUpdate(d);
};

describe('projector', () => {
  it('debounces a burst of changes to one run per document, runs one at a time, and flush() drains it', async () => {
    const r = recorder();
    const p = createProjector({ db: null as never, store: createMemoryUpdateStore(), delayMs: 10_000, project: (id) => r.project(id) });
    for (let i = 0; i < 50; i++) p.notify(i % 2 ? 'a' : 'b');
    expect(r.calls).toEqual([]); // still inside the quiet time
    await p.flush();
    expect(r.calls.sort()).toEqual(['a', 'b']);
    expect(r.overlapped).toBe(false);
    expect(p.projected).toBe(2);
  });

  it('runs by itself after the quiet time', async () => {
    const r = recorder();
    const p = createProjector({ db: null as never, store: createMemoryUpdateStore(), delayMs: 5, project: (id) => r.project(id) });
    p.notify('a');
    const deadline = Date.now() + 5_000;
    while (r.calls.length === 0 && Date.now() < deadline) await new Promise((res) => setTimeout(res, 5));
    expect(r.calls).toEqual(['a']);
  });

  it('reports a failure, keeps going, and projects the document again on its next change', async () => {
    const errors: string[] = [];
    const r = recorder((id, n) => id === 'bad' && n === 1);
    const p = createProjector({ db: null as never, store: createMemoryUpdateStore(), delayMs: 10_000, project: (id) => r.project(id), onError: (_e, id) => errors.push(id) });
    p.notify('bad');
    await p.flush();
    p.notify('good');
    p.notify('bad');
    await p.flush();
    expect(errors).toEqual(['bad']);
    expect(r.calls).toEqual(['bad', 'good', 'bad']);
    await p.close();
    p.notify('late');
    await p.flush();
    expect(r.calls).toHaveLength(3);
  });

  it('withProjection notes a document only after its append committed, and passes everything else through', async () => {
    const r = recorder();
    const inner = createMemoryUpdateStore();
    const p = createProjector({ db: null as never, store: inner, delayMs: 10_000, project: (id) => r.project(id) });
    const store = withProjection(inner, p);
    const seq = await store.append('doc-1', update('hello'), null);
    expect(seq).toBeGreaterThan(0);
    expect((await store.load('doc-1')).updates).toHaveLength(1);
    await store.flush();
    expect(r.calls).toEqual(['doc-1']);
    await store.close();
  });

  it('settleDoc projects one waiting document now and does not wait for runs queued after it', async () => {
    const order: string[] = [];
    let releaseB!: () => void;
    const bHeld = new Promise<void>((resolve) => (releaseB = resolve));
    const p = createProjector({
      db: null as never,
      store: createMemoryUpdateStore(),
      delayMs: 10_000,
      project: async (id) => {
        if (id === 'b') await bHeld; // another document's slow projection
        order.push(id);
      },
    });
    p.notify('a');
    p.notify('b');
    await p.settleDoc('a'); // a is queued first; b is not waited for
    expect(order).toEqual(['a']);
    await p.settleDoc('nothing-waiting');
    const b = p.settleDoc('b');
    releaseB();
    await b;
    expect(order).toEqual(['a', 'b']);
  });

  it('withProjection.flushDoc waits for that document’s append in flight and its projection', async () => {
    const projected: string[] = [];
    const inner = createMemoryUpdateStore();
    const p = createProjector({ db: null as never, store: inner, delayMs: 10_000, project: async (id) => void projected.push(id) });
    const store = withProjection(inner, p);
    const release = inner.holdCommits();
    const appended = store.append('doc-1', update('held'), null);
    const flushed = store.flushDoc!('doc-1');
    let done = false;
    void flushed.then(() => (done = true));
    await new Promise((r) => setImmediate(r));
    expect(done).toBe(false); // the append is still held
    release();
    await flushed;
    await appended;
    expect(projected).toEqual(['doc-1']);
    expect(inner.rows('doc-1')).toHaveLength(1);
  });
});
