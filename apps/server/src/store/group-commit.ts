/**
 * Group commit: items submitted while a commit is in flight wait and go together in the next one.
 * One commit in flight at a time; each caller learns its own result (or its batch's error).
 */
export class GroupCommit<T, R> {
  private queue: Array<{ item: T; resolve: (r: R) => void; reject: (e: unknown) => void }> = [];
  private running: Promise<void> | null = null;

  /** Moving average of the time between submits (ms): how many items a short wait would gather. */
  private meanGapMs = Infinity;
  private lastSubmit = -Infinity;

  /**
   * `delayMs`: while items arrive faster than one per `delayMs` (a deep, steady stream, not one lone
   * edit), wait this long before a commit so more items share it — PostgreSQL's commit_delay idea,
   * made adaptive: at a sparse rate the wait would gather nothing and only add latency, so none is taken.
   * 0 = never wait.
   */
  constructor(
    private readonly commit: (items: T[]) => Promise<R[]>,
    private readonly maxBatch: number,
    private readonly delayMs = 0,
    /** The clock arrivals are timed by (replaceable in tests). */
    private readonly now: () => number = () => performance.now(),
  ) {}

  submit(item: T): Promise<R> {
    const now = this.now();
    if (this.lastSubmit !== -Infinity) {
      const gap = now - this.lastSubmit;
      // One long pause resets the estimate at once: a lone edit after a burst does not wait.
      this.meanGapMs = this.meanGapMs === Infinity || gap > this.meanGapMs * 5 ? gap : 0.8 * this.meanGapMs + 0.2 * gap;
    }
    this.lastSubmit = now;
    return new Promise<R>((resolve, reject) => {
      this.queue.push({ item, resolve, reject });
      // A microtask's delay lets the messages of one socket read join the first batch.
      this.running ??= Promise.resolve().then(() => this.drain());
    });
  }

  /** Resolves when everything submitted before the call is committed (or failed). */
  async flush(): Promise<void> {
    while (this.running !== null) await this.running;
  }

  get pending(): number {
    return this.queue.length;
  }

  private async drain(): Promise<void> {
    while (this.queue.length > 0) {
      if (this.delayMs > 0 && this.queue.length < this.maxBatch && this.meanGapMs < this.delayMs) {
        await new Promise((resolve) => setTimeout(resolve, this.delayMs));
      }
      const batch = this.queue.splice(0, this.maxBatch);
      try {
        const results = await this.commit(batch.map((entry) => entry.item));
        batch.forEach((entry, i) => entry.resolve(results[i]!));
      } catch (error) {
        for (const entry of batch) entry.reject(error);
      }
    }
    this.running = null;
  }
}
