import * as Y from 'yjs';

/**
 * Per-user undo. Each user's changes are made in transactions carrying that user's origin
 * (`doc.transact(fn, origin)`, or `withOrigin`); the manager tracks only that origin, so undo never
 * removes another coder's work, even when both edit one replica (server-side tools, tests).
 * In the browser each user has their own replica: local changes carry the provider-free origin `null`
 * unless one is given, and remote ones the provider, so `createUndoManager(scope, null)` is per-user there.
 */
/** A type, several types, or a whole document (as Y.UndoManager accepts). */
export type UndoScope = ConstructorParameters<typeof Y.UndoManager>[0];

export function createUndoManager(
  scope: UndoScope,
  origin: unknown,
  opts: { captureTimeout?: number } = {},
): Y.UndoManager {
  return new Y.UndoManager(scope, { trackedOrigins: new Set([origin]), captureTimeout: opts.captureTimeout ?? 500 });
}

/** Run `fn` (which may call any model operation) as one transaction carrying `origin`. */
export function withOrigin<T>(doc: Y.Doc, origin: unknown, fn: () => T): T {
  let out!: T;
  doc.transact(() => {
    out = fn();
  }, origin);
  return out;
}
