/** A number with its noun, singular for one ("1 segment", "2 segments", "0 replies"): one rule for every screen. */
export function countOf(n: number, singular: string, plural = `${singular}s`): string {
  return `${n} ${n === 1 ? singular : plural}`;
}
