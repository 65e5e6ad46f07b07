/**
 * Group commit: items submitted while a commit is in flight wait and go together in the next one.
 * One commit in flight at a time; each caller learns its own result (or its batch's error).
 */
export class GroupCommit<T, R> {
  private queue: Array<{ item: T; resolve: (r: R) => void; reject: (e: unknown) => void }> = [];
  private running: Promise<void> | null = null;

  private lastCommitEnd = -Infinity;

  /**
   * `delayMs`: when a commit ended less than `busyWindowMs` ago (a steady stream, not one lone edit),
   * wait this long before the next so more items share it — PostgreSQL's commit_delay idea. 0 = never.
   */
  constructor(
    private readonly commit: (items: T[]) => Promise<R[]>,
    private readonly maxBatch: number,
    private readonly delayMs = 0,
    private readonly busyWindowMs = 50,
  ) {}

  submit(item: T): Promise<R> {
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
      if (this.delayMs > 0 && this.queue.length < this.maxBatch && performance.now() - this.lastCommitEnd < this.busyWindowMs) {
        await new Promise((resolve) => setTimeout(resolve, this.delayMs));
      }
      const batch = this.queue.splice(0, this.maxBatch);
      try {
        const results = await this.commit(batch.map((entry) => entry.item));
        batch.forEach((entry, i) => entry.resolve(results[i]!));
      } catch (error) {
        for (const entry of batch) entry.reject(error);
      }
      this.lastCommitEnd = performance.now();
    }
    this.running = null;
  }
}
