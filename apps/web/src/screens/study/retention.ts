/** Where a study stands against its retention date (the server's admin/retention.ts decides the same way). */
export const REMINDER_DAYS = 30;
export type RetentionState = 'none' | 'ok' | 'near' | 'past';

export function retentionState(retentionUntil: string | null | undefined, now = Date.now()): { state: RetentionState; days: number } {
  if (!retentionUntil) return { state: 'none', days: 0 };
  const ms = new Date(retentionUntil).getTime() - now;
  const days = Math.ceil(ms / 86_400_000);
  if (ms <= 0) return { state: 'past', days };
  return { state: days <= REMINDER_DAYS ? 'near' : 'ok', days };
}

export const dateOnly = (iso: string) => new Date(iso).toLocaleDateString(undefined, { dateStyle: 'medium' });
