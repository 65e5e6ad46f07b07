/** The model's word diff (Myers) turned into runs to show: unchanged, added and removed words in reading order. */
import { diffWords, splitWords } from '@gloss/model';

export interface Run { kind: 'same' | 'added' | 'removed'; text: string }

export function diffRuns(oldText: string, newText: string): Run[] {
  const a = splitWords(oldText);
  const b = splitWords(newText);
  const removed = new Set<number>();
  const added = new Set<number>();
  for (const c of diffWords(oldText, newText)) {
    for (let k = 0; k < c.words.length; k++) (c.kind === 'removed' ? removed : added).add(c.at + k);
  }
  const runs: Run[] = [];
  const push = (kind: Run['kind'], word: string) => {
    const last = runs[runs.length - 1];
    if (last?.kind === kind) last.text += ` ${word}`;
    else runs.push({ kind, text: word });
  };
  let i = 0;
  let j = 0;
  while (i < a.length || j < b.length) {
    if (i < a.length && removed.has(i)) push('removed', a[i++]!);
    else if (j < b.length && added.has(j)) push('added', b[j++]!);
    else {
      push('same', b[j] ?? a[i]!);
      i++;
      j++;
    }
  }
  return runs;
}

/** A codebook version as lines of text, so two versions can be compared word by word. */
export function codebookText(codes: Array<{ label: string; briefDefinition?: unknown; inclusion?: unknown; exclusion?: unknown; status?: unknown }>): string {
  return [...codes]
    .sort((x, y) => x.label.localeCompare(y.label))
    .map((c) => `${c.label}${c.status && c.status !== 'active' ? ` (${String(c.status)})` : ''}: ${String(c.briefDefinition ?? '')} Include: ${String(c.inclusion ?? '')} Exclude: ${String(c.exclusion ?? '')}`)
    .join('\n');
}
