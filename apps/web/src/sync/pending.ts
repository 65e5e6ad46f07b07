/**
 * Counts local changes made while a document's connection was down, so the screen can say plainly
 * what is waiting to be sent. Kept in localStorage so the count survives a reload while offline
 * (the changes themselves survive in IndexedDB).
 */
const key = (room: string) => `gloss:pending:${room}`;

export function readPending(room: string): number {
  try {
    return Number(localStorage.getItem(key(room)) ?? 0) || 0;
  } catch {
    return 0;
  }
}

export function writePending(room: string, n: number): void {
  try {
    if (n > 0) localStorage.setItem(key(room), String(n));
    else localStorage.removeItem(key(room));
  } catch {
    // storage full or disabled: the count is only advisory, the changes are in IndexedDB
  }
}
