/** Milliseconds from clock fields, or null when minutes or seconds are out of range (>= 60). */
export function clockToMs(hours: number, minutes: number, seconds: number, millis: number): number | null {
  if (minutes > 59 || seconds > 59) return null;
  return ((hours * 60 + minutes) * 60 + seconds) * 1000 + millis;
}

/** A fraction of a second as written (`5`, `50`, `500`, `5000`) to whole milliseconds. */
export function fractionToMs(digits: string | undefined): number {
  if (!digits) return 0;
  return Math.round(Number(`0.${digits}`) * 1000);
}

/** Formats milliseconds as h:mm:ss.mmm for messages. */
export function formatMs(ms: number): string {
  const h = Math.floor(ms / 3_600_000);
  const m = Math.floor(ms / 60_000) % 60;
  const s = Math.floor(ms / 1000) % 60;
  const f = ms % 1000;
  return `${h}:${String(m).padStart(2, '0')}:${String(s).padStart(2, '0')}.${String(f).padStart(3, '0')}`;
}
