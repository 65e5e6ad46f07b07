/** A codebook field's name in words, for the history and the "changed since you last looked" list (pure). */
const WORDS: Record<string, string> = {
  briefDefinition: 'brief definition',
  fullDefinition: 'full definition',
  inclusion: 'when to use',
  exclusion: 'when not to use',
};

export function fieldWords(field: string): string {
  return WORDS[field] ?? field;
}
