/**
 * A code's colour and mark in small: a tinted box underlined the way the code's words are underlined
 * in the transcript (solid, dashed, dotted, double), so a swatch and the text read alike.
 */
import type { CodeMark } from '@gloss/model';

export function CodeSwatch(props: { mark: CodeMark | undefined }) {
  const hex = () => props.mark?.hex ?? '#888888';
  return (
    <span
      class="swatch code-swatch"
      data-mark={props.mark?.mark ?? 'solid'}
      style={{ 'background-color': `${hex()}40`, 'border-bottom': `${props.mark?.mark === 'double' ? 4 : 3}px ${props.mark?.mark ?? 'solid'} ${hex()}` }}
      aria-hidden="true"
    />
  );
}

/** The mark in words, for labels read aloud (colour names are left out: the palette's names are not the point). */
export function markWords(m: CodeMark | undefined): string {
  return m ? `${m.mark} line` : '';
}
