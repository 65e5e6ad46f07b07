/**
 * Who is editing which codebook field, published on the codebook room's awareness as
 * `editing: {codeId, field, at}` (`at` a caret offset). Other editors' carets are drawn over the field
 * by measuring a hidden mirror of it (the usual technique for caret coordinates in a textarea).
 */
import type { Awareness } from 'y-protocols/awareness';

export interface FieldEditor { clientId: number; name: string; colour: string; codeId: string; field: string; at: number }

export function readEditors(aw: Awareness): FieldEditor[] {
  const out: FieldEditor[] = [];
  aw.getStates().forEach((st, clientId) => {
    if (clientId === aw.clientID) return;
    const u = st.user as { name?: string; colour?: string } | undefined;
    const e = st.editing as { codeId?: string; field?: string; at?: number } | undefined;
    if (u && e?.codeId && e.field && typeof e.at === 'number') out.push({ clientId, name: u.name ?? '', colour: u.colour ?? '#777777', codeId: e.codeId, field: e.field, at: e.at });
  });
  return out;
}

/** Pixel position of character `at` inside a textarea or input, relative to the field's box. */
export function caretCoordinates(el: HTMLTextAreaElement | HTMLInputElement, at: number): { x: number; y: number; h: number } {
  const cs = getComputedStyle(el);
  const mirror = document.createElement('div');
  for (const p of ['font', 'letterSpacing', 'lineHeight', 'padding', 'border', 'boxSizing', 'width', 'textIndent', 'wordSpacing', 'tabSize'] as const) {
    (mirror.style as unknown as Record<string, string>)[p] = (cs as unknown as Record<string, string>)[p]!;
  }
  mirror.style.position = 'absolute';
  mirror.style.visibility = 'hidden';
  mirror.style.whiteSpace = el instanceof HTMLTextAreaElement ? 'pre-wrap' : 'pre';
  mirror.style.overflowWrap = 'break-word';
  mirror.textContent = el.value.slice(0, at);
  const mark = document.createElement('span');
  mark.textContent = '\u200b';
  mirror.append(mark);
  document.body.append(mirror);
  const x = mark.offsetLeft - el.scrollLeft;
  const y = mark.offsetTop - el.scrollTop;
  const h = mark.offsetHeight || parseFloat(cs.lineHeight) || 16;
  mirror.remove();
  return { x, y, h };
}
