/**
 * Word-level diff (Myers 1986, "An O(ND) Difference Algorithm and Its Variations", Algorithmica 1),
 * after trimming the common prefix and suffix. Words are maximal runs of non-space characters.
 */
export interface WordChange {
  kind: 'added' | 'removed';
  words: string[];
  /** Index of the first word in the old (removed) or new (added) word list. */
  at: number;
}

export function splitWords(s: string): string[] {
  return s.split(/\s+/).filter(Boolean);
}

/** Above this many cells of bookkeeping the middle is reported as one replacement (stays fast and bounded). */
const MAX_TRACE_CELLS = 20_000_000;

export function diffWords(oldText: string, newText: string): WordChange[] {
  const a = splitWords(oldText);
  const b = splitWords(newText);
  let pre = 0;
  while (pre < a.length && pre < b.length && a[pre] === b[pre]) pre++;
  let suf = 0;
  while (suf < a.length - pre && suf < b.length - pre && a[a.length - 1 - suf] === b[b.length - 1 - suf]) suf++;
  const A = a.slice(pre, a.length - suf);
  const B = b.slice(pre, b.length - suf);
  const ops = myers(A, B);
  const out: WordChange[] = [];
  for (const op of ops) {
    const last = out[out.length - 1];
    const at = (op.kind === 'removed' ? op.i : op.j) + pre;
    const word = op.kind === 'removed' ? A[op.i]! : B[op.j]!;
    if (last !== undefined && last.kind === op.kind && last.at + last.words.length === at) last.words.push(word);
    else out.push({ kind: op.kind, words: [word], at });
  }
  return out;
}

type Edit = { kind: 'added' | 'removed'; i: number; j: number };

function myers(A: string[], B: string[]): Edit[] {
  const n = A.length;
  const m = B.length;
  if (n === 0) return B.map((_, j) => ({ kind: 'added' as const, i: 0, j }));
  if (m === 0) return A.map((_, i) => ({ kind: 'removed' as const, i, j: 0 }));
  const max = n + m;
  const offset = max;
  const v = new Int32Array(2 * max + 2);
  const trace: Int32Array[] = [];
  let cells = 0;
  for (let d = 0; d <= max; d++) {
    trace.push(v.slice());
    cells += v.length;
    if (cells > MAX_TRACE_CELLS) return [...A.map((_, i) => ({ kind: 'removed' as const, i, j: 0 })), ...B.map((_, j) => ({ kind: 'added' as const, i: n, j }))];
    for (let k = -d; k <= d; k += 2) {
      let x = k === -d || (k !== d && v[offset + k - 1]! < v[offset + k + 1]!) ? v[offset + k + 1]! : v[offset + k - 1]! + 1;
      let y = x - k;
      while (x < n && y < m && A[x] === B[y]) {
        x++;
        y++;
      }
      v[offset + k] = x;
      if (x >= n && y >= m) return backtrack(trace, A, B, offset, d);
    }
  }
  return [];
}

function backtrack(trace: Int32Array[], A: string[], B: string[], offset: number, dEnd: number): Edit[] {
  const edits: Edit[] = [];
  let x = A.length;
  let y = B.length;
  for (let d = dEnd; d > 0; d--) {
    const v = trace[d]!;
    const k = x - y;
    const prevK = k === -d || (k !== d && v[offset + k - 1]! < v[offset + k + 1]!) ? k + 1 : k - 1;
    const prevX = v[offset + prevK]!;
    const prevY = prevX - prevK;
    while (x > prevX && y > prevY) {
      x--;
      y--;
    }
    if (x === prevX) edits.push({ kind: 'added', i: x, j: prevY });
    else edits.push({ kind: 'removed', i: prevX, j: y });
    x = prevX;
    y = prevY;
  }
  return edits.reverse();
}
