/**
 * Binds a <textarea> or <input> to a Y.Text both ways. Local typing becomes a minimal Yjs edit (only the
 * changed middle), so concurrent edits elsewhere in the field survive; remote edits update the field and
 * shift the local caret by the remote delta, so the person typing is not thrown about.
 */
import * as Y from 'yjs';

type Field = HTMLTextAreaElement | HTMLInputElement;
const LOCAL = Symbol('gloss-local-edit');

/** Where `pos` moves to after `delta` (a Y.Text event delta) is applied before it. */
export function shiftThrough(delta: Array<{ retain?: number; insert?: unknown; delete?: number }>, pos: number): number {
  let at = 0;
  let out = pos;
  for (const op of delta) {
    if (op.retain) at += op.retain;
    else if (op.insert !== undefined) {
      const n = typeof op.insert === 'string' ? op.insert.length : 1;
      if (at <= pos) out += n;
      at += n;
    } else if (op.delete) {
      if (at < pos) out -= Math.min(op.delete, pos - at);
    }
    if (at > pos) break;
  }
  return Math.max(0, out);
}

/** The smallest edit turning `a` into `b`: [index, deleteCount, insert]. */
export function diff(a: string, b: string): [number, number, string] {
  let p = 0;
  while (p < a.length && p < b.length && a[p] === b[p]) p++;
  let s = 0;
  while (s < a.length - p && s < b.length - p && a[a.length - 1 - s] === b[b.length - 1 - s]) s++;
  return [p, a.length - p - s, b.slice(p, b.length - s)];
}

export function bindField(el: Field, ytext: Y.Text, opts: { readOnly?: boolean } = {}): () => void {
  el.value = ytext.toString();
  el.readOnly = !!opts.readOnly;
  const onInput = () => {
    const [i, del, ins] = diff(ytext.toString(), el.value);
    if (del === 0 && ins === '') return;
    ytext.doc!.transact(() => {
      if (del) ytext.delete(i, del);
      if (ins) ytext.insert(i, ins);
    }, LOCAL);
  };
  const onChange = (e: Y.YTextEvent, tr: Y.Transaction) => {
    if (tr.origin === LOCAL) return;
    const focused = document.activeElement === el;
    const s = el.selectionStart ?? 0;
    const t = el.selectionEnd ?? 0;
    el.value = ytext.toString();
    if (focused) el.setSelectionRange(shiftThrough(e.delta as never, s), shiftThrough(e.delta as never, t));
  };
  el.addEventListener('input', onInput);
  ytext.observe(onChange);
  return () => {
    el.removeEventListener('input', onInput);
    ytext.unobserve(onChange);
  };
}
