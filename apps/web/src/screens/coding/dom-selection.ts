/**
 * Maps between the browser's selection and character offsets of the transcript. Each turn's words
 * are one text node inside an element `.words[data-start]`, so an offset is data-start + node offset.
 */
export function offsetOf(node: Node | null, nodeOffset: number): number | null {
  if (!node) return null;
  const el = (node.nodeType === Node.TEXT_NODE ? node.parentElement : (node as Element))?.closest<HTMLElement>('.words');
  if (!el) {
    // a point outside any words (speaker label, margin): snap to its turn's start
    const turn = (node.nodeType === Node.TEXT_NODE ? node.parentElement : (node as Element))?.closest<HTMLElement>('.turn');
    const w = turn?.querySelector<HTMLElement>('.words');
    return w ? Number(w.dataset.start) : null;
  }
  const start = Number(el.dataset.start);
  if (node.nodeType === Node.TEXT_NODE) return start + nodeOffset;
  return nodeOffset === 0 ? start : start + (el.textContent?.length ?? 0);
}

export function readDomSelection(root: HTMLElement): { start: number; end: number } | null {
  const s = document.getSelection();
  if (!s || s.rangeCount === 0 || s.isCollapsed) return null;
  const r = s.getRangeAt(0);
  if (!root.contains(r.startContainer) || !root.contains(r.endContainer)) return null;
  const a = offsetOf(r.startContainer, r.startOffset);
  const b = offsetOf(r.endContainer, r.endOffset);
  if (a === null || b === null || a === b) return null;
  return { start: Math.min(a, b), end: Math.max(a, b) };
}

/** A DOM Range over [start, end) of the transcript, when those words are rendered. */
export function rangeFor(root: HTMLElement, start: number, end: number): Range | null {
  const words = root.querySelectorAll<HTMLElement>('.words');
  const locate = (off: number): [Node, number] | null => {
    // binary search over the rendered turns by data-start
    let lo = 0;
    let hi = words.length - 1;
    let found = -1;
    while (lo <= hi) {
      const mid = (lo + hi) >> 1;
      if (Number(words[mid]!.dataset.start) <= off) {
        found = mid;
        lo = mid + 1;
      } else hi = mid - 1;
    }
    if (found < 0) return null;
    const el = words[found]!;
    const node = el.firstChild;
    if (!node) return [el, 0];
    const len = node.textContent?.length ?? 0;
    return [node, Math.max(0, Math.min(len, off - Number(el.dataset.start)))];
  };
  const a = locate(start);
  const b = locate(end);
  if (!a || !b) return null;
  const r = document.createRange();
  r.setStart(a[0], a[1]);
  r.setEnd(b[0], b[1]);
  return r;
}
