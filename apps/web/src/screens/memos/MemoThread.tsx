/**
 * The replies under a memo or jotting, and a Reply form for those who may write memos: shown on the
 * memos screen and beside the passage in the coding view (one component, so both follow the same rules).
 */
import { For, Show, createMemo, createSignal } from 'solid-js';
import * as Y from 'yjs';
import { addReply, listReplies, MEMOS_ROOT, removeMemo, type MemoView } from '@gloss/model';
import { errorMessage } from '../../api/errors.js';
import { refusedMessage, savedMessage } from '../coding/coding-actions.js';
import type { Me } from '../../api/types.js';
import type { OpenDoc } from '../../sync/open-doc.js';

/**
 * The replies under one memo, and a Reply form for those who may write memos. What it says comes
 * from the server's answer: "Saved." once the server kept the reply, its refusal in words otherwise
 * (the reply is then taken back here), as in the coding view.
 */
export function Thread(props: { memo: MemoView; mm: OpenDoc; me: Me; nameOf: (id: string) => string; version: () => unknown; mayReply: boolean }) {
  const doc = props.mm.doc;
  const replies = createMemo(() => {
    props.version();
    return listReplies(doc, props.memo.id);
  });
  const [draft, setDraft] = createSignal<string | null>(null);
  const [said, setSaid] = createSignal('');
  let input: HTMLTextAreaElement | undefined;
  const what = props.memo.kind === 'jotting' ? 'jotting' : 'memo';

  const send = async () => {
    const body = draft() ?? '';
    // only this change is taken back if the server refuses it
    const takeBack = new Y.UndoManager([doc.getMap(MEMOS_ROOT)], { trackedOrigins: new Set([null]), captureTimeout: 0 });
    try {
      addReply(doc, props.memo.id, { author: props.me.id, body });
    } catch (err) {
      takeBack.destroy();
      setSaid(`Not done: ${errorMessage(err)}`);
      return;
    }
    takeBack.trackedOrigins.delete(null);
    setDraft(null);
    setSaid('Reply added. Sending…');
    const answer = await props.mm.confirm();
    if (answer.outcome === 'refused') {
      takeBack.undo();
      setSaid(refusedMessage(answer.reason));
    } else setSaid(savedMessage('Reply added.', answer.outcome));
    takeBack.destroy();
  };

  return (
    <div class="memo-thread">
      <Show when={replies().length > 0}>
        <ul class="replies" aria-label={`Replies to this ${what}`}>
          <For each={replies()}>
            {(r) => (
              <li class="reply" data-testid="memo-reply">
                <span class="muted">{props.nameOf(r.author)}, {new Date(r.createdAt).toLocaleString()}:</span>
                <p class="memo-body">{r.body}</p>
                <Show when={r.author === props.me.id}>
                  <button type="button" class="quiet" onClick={() => {
                    if (!confirm('Delete your reply?')) return;
                    try { removeMemo(doc, r.id); setSaid('Reply deleted.'); } catch (err) { setSaid(`Not done: ${errorMessage(err)}`); }
                  }}>Delete reply</button>
                </Show>
              </li>
            )}
          </For>
        </ul>
      </Show>
      <Show when={props.mayReply}>
        <Show when={draft() !== null} fallback={
          <button type="button" class="quiet" onClick={() => { setDraft(''); setSaid(''); queueMicrotask(() => input?.focus()); }}>Reply</button>
        }>
          <form class="inline-form" aria-label={`Reply to this ${what}`} onSubmit={(e) => { e.preventDefault(); void send(); }}>
            <label>Your reply <textarea ref={input} rows="2" value={draft()!} onInput={(e) => setDraft(e.currentTarget.value)} required /></label>
            <button type="submit">Send reply</button>
            <button type="button" class="quiet" onClick={() => setDraft(null)}>Cancel</button>
          </form>
        </Show>
      </Show>
      <Show when={said()}><p class="progress" role="status" data-testid="reply-message">{said()}</p></Show>
    </div>
  );
}
