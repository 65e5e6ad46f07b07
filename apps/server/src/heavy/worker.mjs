// The entry of each heavy-work thread (pool.ts). Gloss runs from TypeScript sources: the thread
// registers tsx's loader itself, so it works whether or not its parent was started with
// `--import tsx` (the server is; a test runner's process may not be).
import { register } from 'tsx/esm/api';

register();
const { JOBS, packError } = await import('./jobs.ts');

/**
 * One task: `{ job, input, port? }` → `{ ok }` or `{ error }` (a typed error, packed). Progress goes out
 * on `port`, closed by a final `'end'` so the caller knows every progress message has arrived (the
 * reply travels on another channel and may overtake them).
 */
export default async function run({ job, input, port }) {
  const onProgress = port ? (fraction) => port.postMessage(fraction) : undefined;
  try {
    return { ok: await JOBS[job](input, onProgress) };
  } catch (err) {
    const packed = packError(err);
    if (packed) return { error: packed };
    throw err;
  } finally {
    port?.postMessage('end');
    port?.close();
  }
}
