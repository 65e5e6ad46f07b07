/**
 * "Words read" for a round's progress board: the words of the speaker turns that have been on the
 * participant's screen in the round's coding view. An IntersectionObserver watches each turn's words
 * (keyed by the turn's offset, `data-start`); the running total goes to the server at most every
 * `everyMs` and once more when the view closes. The server keeps the highest figure it was sent.
 */
export function countWords(s: string): number {
  return s.match(/\S+/g)?.length ?? 0;
}

export function trackReading(root: HTMLElement, report: (words: number) => void, everyMs = 3000): () => void {
  const seen = new Map<string, number>();
  let sent = 0;
  const io = new IntersectionObserver((entries) => {
    for (const e of entries) {
      if (!e.isIntersecting) continue;
      const el = e.target as HTMLElement;
      const key = el.dataset.start ?? el.textContent ?? '';
      if (!seen.has(key)) seen.set(key, countWords(el.textContent ?? ''));
    }
  });
  const watched = new WeakSet<Element>();
  let queued = false;
  // turns are rendered as the transcript grows: watch new ones, at most once a frame
  const scan = () => {
    queued = false;
    root.querySelectorAll('.transcript .words').forEach((el) => {
      if (watched.has(el)) return;
      watched.add(el);
      io.observe(el);
    });
  };
  const mo = new MutationObserver(() => {
    if (!queued) (queued = true), requestAnimationFrame(scan);
  });
  mo.observe(root, { childList: true, subtree: true });
  scan();
  const flush = () => {
    let n = 0;
    for (const w of seen.values()) n += w;
    if (n > sent) {
      sent = n;
      report(n);
    }
  };
  const timer = setInterval(flush, everyMs);
  return () => {
    clearInterval(timer);
    mo.disconnect();
    io.disconnect();
    flush();
  };
}
