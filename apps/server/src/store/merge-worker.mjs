// The thread that merges Yjs updates for compaction (merge-off-thread.ts). Plain JavaScript on
// purpose: it needs only yjs, so it starts without the TypeScript loader.
import { parentPort } from 'node:worker_threads';
import * as Y from 'yjs';

parentPort.on('message', ({ id, parts }) => {
  try {
    const data = Y.mergeUpdates(parts);
    parentPort.postMessage({ id, data }, [data.buffer]);
  } catch (err) {
    parentPort.postMessage({ id, error: String(err?.stack ?? err) });
  }
});
