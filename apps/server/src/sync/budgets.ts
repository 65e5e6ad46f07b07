/**
 * The sync layer's resource budgets (issue 13): what one connection, one person, one address and one
 * node may hold. Each is configurable (config.ts, README's table); each refusal is a clean close code
 * or an HTTP 429 at the upgrade, with one log line, never a crash or unbounded growth.
 */
export interface SyncBudgets {
  /** Bytes one connection may send before its room has loaded (held in memory until then). */
  maxBacklogBytes: number;
  /** Bytes held for one connection: its updates awaiting commit plus what waits to be written to its socket. */
  maxPendingBytesPerConnection: number;
  /** Updates awaiting commit on this node: past this, socket reads pause until it halves; past twice this, senders are closed. */
  maxCommitQueue: number;
  /** The same, in bytes. */
  maxCommitQueueBytes: number;
  /** Open sync connections from one client address (429 at the upgrade beyond). */
  maxConnectionsPerAddress: number;
  /** Open sync connections of one person (429 at the upgrade beyond). */
  maxConnectionsPerUser: number;
  /** Sustained messages per second one connection may send (token bucket)… */
  maxMessagesPerSecond: number;
  /** …and how many it may send at once above that rate. */
  messageBurst: number;
  /** Documents loaded on this node at once; idle ones are unloaded least recently used first, busy ones refuse newcomers. */
  maxLoadedDocuments: number;
  /** A room whose load takes longer fails its waiting connections (1013). */
  roomLoadTimeoutMs: number;
  /** A room's unload waits this long for its own commits and projection; a rejoining connection waits as long. */
  roomUnloadTimeoutMs: number;
  /** A room nobody has open stays loaded this long for a quick return (0: unloaded at once). */
  roomIdleMs: number;
}

export const DEFAULT_BUDGETS: SyncBudgets = {
  maxBacklogBytes: 16 * 1024 * 1024,
  maxPendingBytesPerConnection: 64 * 1024 * 1024,
  maxCommitQueue: 10_000,
  maxCommitQueueBytes: 64 * 1024 * 1024,
  maxConnectionsPerAddress: 500,
  maxConnectionsPerUser: 100,
  maxMessagesPerSecond: 100,
  messageBurst: 500,
  maxLoadedDocuments: 10_000,
  roomLoadTimeoutMs: 30_000,
  roomUnloadTimeoutMs: 30_000,
  roomIdleMs: 0,
};

/**
 * A token bucket (common practice for rate limits): `burst` tokens, refilled at `perSecond`; each
 * message takes one. `now` is replaceable so tests need no clock.
 */
export class TokenBucket {
  private tokens: number;
  private last: number;

  constructor(
    private readonly perSecond: number,
    private readonly burst: number,
    private readonly now: () => number = () => performance.now(),
  ) {
    this.tokens = burst;
    this.last = now();
  }

  /** Takes a token; false when none is left. */
  take(): boolean {
    const t = this.now();
    this.tokens = Math.min(this.burst, this.tokens + ((t - this.last) / 1000) * this.perSecond);
    this.last = t;
    if (this.tokens < 1) return false;
    this.tokens -= 1;
    return true;
  }
}

/** Open connections per key (an address, a person). */
export class ConnectionCounts {
  private readonly counts = new Map<string, number>();

  constructor(private readonly max: number) {}

  /** Counts one more for `key`, or false when it already holds `max`. */
  tryAdd(key: string): boolean {
    const n = this.counts.get(key) ?? 0;
    if (n >= this.max) return false;
    this.counts.set(key, n + 1);
    return true;
  }

  remove(key: string): void {
    const n = (this.counts.get(key) ?? 0) - 1;
    if (n <= 0) this.counts.delete(key);
    else this.counts.set(key, n);
  }

  get keys(): number {
    return this.counts.size;
  }
}

/** Something whose socket reads can stop and start again (a Connection). */
export interface Pausable {
  pauseReads(): void;
  resumeReads(): void;
}

/**
 * The node's commit queue, as the sync layer fills it: updates submitted and not yet committed (or
 * failed), by count and bytes. While it is deep (at its limit), senders' socket reads pause; they all
 * resume once it has drained to half. A sender that still adds past twice the limit (messages already
 * read when its socket paused) is refused.
 */
export class CommitQueueBudget {
  private count = 0;
  private bytes = 0;
  private readonly paused = new Set<Pausable>();

  constructor(
    private readonly maxCount: number,
    private readonly maxBytes: number,
  ) {}

  /** Whether the queue has room for `size` more bytes under the hard bound (twice the limit). */
  admits(size: number): boolean {
    return this.count + 1 <= this.maxCount * 2 && this.bytes + size <= this.maxBytes * 2;
  }

  /** Counts an update in; pauses `sender` while the queue is deep. */
  add(size: number, sender: Pausable | null): void {
    this.count++;
    this.bytes += size;
    if (sender !== null && this.deep && !this.paused.has(sender)) {
      this.paused.add(sender);
      sender.pauseReads();
    }
  }

  /** Counts an update out (committed or failed); resumes every paused sender once the queue is at half. */
  done(size: number): void {
    this.count--;
    this.bytes -= size;
    if (this.paused.size > 0 && this.count <= this.maxCount / 2 && this.bytes <= this.maxBytes / 2) {
      const senders = [...this.paused];
      this.paused.clear();
      for (const s of senders) s.resumeReads();
    }
  }

  /** A closed sender is no longer resumed. */
  forget(sender: Pausable): void {
    this.paused.delete(sender);
  }

  get deep(): boolean {
    return this.count >= this.maxCount || this.bytes >= this.maxBytes;
  }

  stats(): { queued: number; queuedBytes: number; pausedSenders: number } {
    return { queued: this.count, queuedBytes: this.bytes, pausedSenders: this.paused.size };
  }
}
