/**
 * Group commit: items submitted while a commit is in flight wait and go together in the next one.
 * One commit in flight at a time; each caller learns its own result (or its batch's error).
 */
export class GroupCommit<T, R> {
  private queue: Array<{ item: T; resolve: (r: R) => void; reject: (e: unknown) => void }> = [];
  private running: Promise<void> | null = null;

  constructor(
    private readonly commit: (items: T[]) => Promise<R[]>,
    private readonly maxBatch: number,
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
