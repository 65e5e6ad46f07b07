/** A codebook field's name in words, for the history and the "changed since you last looked" list (pure). */
import type { ChangeEntry } from '@gloss/model';

const WORDS: Record<string, string> = {
  briefDefinition: 'brief definition',
  fullDefinition: 'full definition',
  inclusion: 'when to use',
  exclusion: 'when not to use',
  examples: 'examples',
  nearMisses: 'near-misses',
  parentId: 'parent',
  label: 'label',
};

export function fieldWords(field: string): string {
  return WORDS[field] ?? field;
}

/** What one change did, in words, without the document's keys ("near-miss added", "added to theme X"). */
export function changeWords(h: Pick<ChangeEntry, 'kind' | 'field' | 'detail'>): string {
  const removed = h.detail?.startsWith('removed') ?? false;
  switch (h.kind) {
    case 'add': return 'added';
    case 'edit': return h.field ? `${fieldWords(h.field)} edited` : 'edited';
    case 'rename': return 'renamed';
    case 'move': return 'moved under another code';
    case 'merge': return 'merged';
    case 'split': return 'split';
    case 'retire': return 'retired';
    case 'status': return 'status changed';
    case 'example': return `${h.field === 'nearMisses' ? 'near-miss' : 'example'} ${removed ? 'removed' : 'added'}`;
    case 'theme': return h.detail ? `${h.detail} (theme)` : 'themes changed';
    case 'exclusive-set': return h.detail ? `${h.detail} (mutually exclusive set)` : 'mutually exclusive sets changed';
    case 'round': return h.detail ?? 'round';
  }
}
