// @vitest-environment jsdom
// Two-way binding of a field to a Y.Text: two replicas (real Yjs, real DOM via jsdom) converge and the
// caret of the person typing shifts past a remote insert (the usual expectation of collaborative editors:
// common practice, e.g. the y-textarea / y-codemirror bindings).
import { describe, expect, it } from 'vitest';
import * as Y from 'yjs';
import { bindField, diff, shiftThrough } from './ytext-binding.js';

function pair() {
  const a = new Y.Doc();
  const b = new Y.Doc();
  a.on('update', (u: Uint8Array) => Y.applyUpdate(b, u, 'remote'));
  b.on('update', (u: Uint8Array) => Y.applyUpdate(a, u, 'remote'));
  return [a, b] as const;
}

describe('ytext binding', () => {
  it('computes the minimal middle edit', () => {
    expect(diff('the hall was cold', 'the big hall was cold')).toEqual([4, 0, 'big ']);
    expect(diff('abc', 'abc')).toEqual([3, 0, '']);
    expect(diff('abcdef', 'abXef')).toEqual([2, 2, 'X']);
  });

  it('shifts a caret after an insert before it, not after one behind it', () => {
    expect(shiftThrough([{ insert: 'xx' }], 3)).toBe(5);
    expect(shiftThrough([{ retain: 5 }, { insert: 'xx' }], 3)).toBe(3);
    expect(shiftThrough([{ delete: 2 }], 3)).toBe(1);
  });

  it('sends typing to the other replica and keeps the local caret in place on a remote edit', () => {
    const [a, b] = pair();
    a.getText('f').insert(0, 'Volunteers stay for friendship.');
    const ta = document.createElement('textarea');
    const tb = document.createElement('textarea');
    document.body.append(ta, tb);
    bindField(ta, a.getText('f'));
    bindField(tb, b.getText('f'));
    expect(tb.value).toBe('Volunteers stay for friendship.');

    tb.value = 'Volunteers stay for friendship and films.';
    tb.dispatchEvent(new Event('input'));
    expect(ta.value).toBe('Volunteers stay for friendship and films.');

    ta.focus();
    ta.setSelectionRange(16, 16); // just before "for"
    b.getText('f').insert(0, 'Many ');
    expect(ta.value).toBe('Many Volunteers stay for friendship and films.');
    expect(ta.selectionStart).toBe(21);
  });
});
