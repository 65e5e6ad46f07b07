/**
 * A room's lifecycle as an explicit state machine:
 *
 *   loading ──▶ open ──▶ unloading ──▶ closed
 *      │
 *      └──▶ failed   (the load threw or took longer than its timeout)
 *
 * Only these moves are allowed; any other is a bug and throws. `settled` resolves when the room
 * reaches `closed` or `failed`, so a connection arriving during the unload can wait for it.
 */
export type RoomState = 'loading' | 'open' | 'unloading' | 'closed' | 'failed';

const MOVES: Record<RoomState, readonly RoomState[]> = {
  loading: ['open', 'failed'],
  open: ['unloading'],
  unloading: ['closed'],
  closed: [],
  failed: [],
};

export class RoomStateError extends Error {
  constructor(from: RoomState, to: RoomState) {
    super(`room cannot go from ${from} to ${to}`);
    this.name = 'RoomStateError';
  }
}

export class RoomStateMachine {
  private current: RoomState = 'loading';
  private settle!: () => void;
  /** Resolves once the room is closed or failed (never rejects). */
  readonly settled = new Promise<void>((resolve) => (this.settle = resolve));

  get state(): RoomState {
    return this.current;
  }

  /** Whether the room is past its life (closed or failed): a new room must be made for its name. */
  get ended(): boolean {
    return this.current === 'closed' || this.current === 'failed';
  }

  to(next: RoomState): void {
    if (!MOVES[this.current].includes(next)) throw new RoomStateError(this.current, next);
    this.current = next;
    if (this.ended) this.settle();
  }
}

/** Why a room could not be used: its load failed or timed out, or its unload did not end in time. */
export class RoomError extends Error {
  constructor(
    readonly code: 'load-failed' | 'load-timeout' | 'unload-timeout' | 'too-many-documents',
    message: string,
    options?: { cause?: unknown },
  ) {
    super(message, options);
    this.name = 'RoomError';
  }
}

/** `promise`, or a RoomError after `ms` (the timer does not keep the process alive). */
export function within<T>(promise: Promise<T>, ms: number, onTimeout: () => RoomError): Promise<T> {
  let timer: NodeJS.Timeout | undefined;
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(onTimeout()), ms);
    timer.unref();
  });
  return Promise.race([promise, timeout]).finally(() => clearTimeout(timer));
}
