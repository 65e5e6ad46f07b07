/**
 * Heavy work off the event loop: a small pool of worker threads (piscina) runs the jobs of jobs.ts, so
 * a report with 10,000 bootstrap replicates, a large DOCX or a project archive never stalls sync or
 * other requests. Each thread has a memory ceiling (resourceLimits: a job that exceeds it ends that
 * thread only, and the pool starts another), each job a time limit (the thread running it is
 * terminated), and the queue a length (a full queue refuses at once rather than piling up).
 * `inlineHeavy` runs the same jobs in the calling thread, for the command line (its own process) and
 * bare app tests.
 */
import { MessageChannel } from 'node:worker_threads';
import { Piscina } from 'piscina';
import type { Logger } from '../logger.js';
import { HeavyError } from './errors.js';
import { JOBS, unpackError, type JobInput, type JobName, type JobOutput, type PackedError } from './jobs.js';

export interface HeavyWork {
  run<K extends JobName>(job: K, input: JobInput<K>, opts?: { onProgress?: (fraction: number) => void }): Promise<JobOutput<K>>;
  /** Jobs started and not yet finished (running or waiting), threads alive, jobs waiting for a thread: for health and logs. */
  stats(): { running: number; threads: number; queued: number };
  close(): Promise<void>;
}

export interface HeavyPoolOptions {
  /** Most threads at once. */
  threads: number;
  /** A job running longer is stopped (its thread terminated) and fails with `timed_out`. */
  timeoutMs: number;
  /** Old-generation heap ceiling of each thread, MiB. */
  memoryMb: number;
  /** Jobs waiting for a thread; one more is refused with `busy`. */
  maxQueue: number;
  /** An idle thread ends after this long (default 30 s); the next job starts one again. */
  idleMs?: number;
  logger?: Logger;
}

type Reply = { ok: unknown } | { error: PackedError };

const WHAT: Record<JobName, string> = {
  agreement: 'The agreement report',
  transcript: 'Reading the file',
  refi: 'Reading the project file',
  qdpx: 'The project export',
};

export function createHeavyPool(opts: HeavyPoolOptions): HeavyWork {
  const pool = new Piscina({
    filename: new URL('./worker.mjs', import.meta.url).href,
    minThreads: 0,
    maxThreads: opts.threads,
    maxQueue: opts.maxQueue,
    idleTimeout: opts.idleMs ?? 30_000,
    resourceLimits: { maxOldGenerationSizeMb: opts.memoryMb },
  });
  let running = 0;
  return {
    async run(job, input, { onProgress } = {}) {
      running++;
      const channel = onProgress ? new MessageChannel() : null;
      let ended: () => void = () => undefined;
      const progressDone = new Promise<void>((resolve) => (ended = resolve));
      channel?.port1.on('message', (m: number | 'end') => (m === 'end' ? ended() : onProgress!(m)));
      const signal = AbortSignal.timeout(opts.timeoutMs);
      let reply: Reply;
      try {
        reply = (await pool.run({ job, input, ...(channel ? { port: channel.port2 } : {}) }, { signal, ...(channel ? { transferList: [channel.port2] } : {}) })) as Reply;
        // The task answered, so its thread sent 'end' after the last progress message: wait for them.
        if (channel) await progressDone;
      } catch (err) {
        const seconds = Math.round(opts.timeoutMs / 1000);
        if (signal.aborted) {
          opts.logger?.warn({ job, timeoutMs: opts.timeoutMs }, 'heavy job stopped at its time limit');
          throw new HeavyError('timed_out', `${WHAT[job]} took longer than ${seconds} s and was stopped. Ask for less at once (fewer texts, fewer bootstrap replicates, a smaller file).`, { cause: err });
        }
        const code = (err as { code?: unknown }).code;
        if (code === 'ERR_WORKER_OUT_OF_MEMORY') {
          opts.logger?.warn({ job, memoryMb: opts.memoryMb }, 'heavy job stopped at its memory limit');
          throw new HeavyError('out_of_memory', `${WHAT[job]} needed more memory than the server allows one task (${opts.memoryMb} MiB) and was stopped. Ask for less at once, or split the file.`, { cause: err });
        }
        if (err instanceof Error && /queue is at limit/i.test(err.message)) {
          opts.logger?.warn({ job, queued: pool.queueSize }, 'heavy-work queue full: refusing');
          throw new HeavyError('busy', 'The server is busy with other reports, imports and exports. Try again in a minute.', { cause: err });
        }
        throw new HeavyError('failed', `${WHAT[job]} failed on the server.`, { cause: err });
      } finally {
        running--;
        channel?.port1.close();
      }
      if ('error' in reply) throw unpackError(reply.error);
      return reply.ok as never;
    },
    stats: () => ({ running, threads: pool.threads.length, queued: pool.queueSize }),
    close: () => pool.close({ force: true }),
  };
}

/** The same jobs in the calling thread: for the command line and bare app tests (no pool to start or stop). */
export function inlineHeavy(): HeavyWork {
  return {
    async run(job, input, { onProgress } = {}) {
      const fn = JOBS[job] as (input: unknown, onProgress?: (f: number) => void) => unknown;
      return (await fn(input, onProgress)) as never;
    },
    stats: () => ({ running: 0, threads: 0, queued: 0 }),
    close: async () => undefined,
  };
}
