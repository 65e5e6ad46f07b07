/**
 * The jottings and memos on what is chosen in the coding view (a segment, or the words a jotting is
 * anchored to), each with its replies and a Reply control: the memos screen's thread, so replies follow
 * the same rules and messages wherever they are written.
 */
import { For, Show, createMemo } from 'solid-js';
import type { MemoView } from '@gloss/model';
import type { Me } from '../../api/types.js';
import type { OpenDoc } from '../../sync/open-doc.js';
import { Thread } from '../memos/MemoThread.js';

export function NotesHere(props: {
  /** What the notes are on, for the heading: "this segment" or "these words". */
  on: string;
  notes: MemoView[];
  mm: OpenDoc;
  me: Me;
  nameOf: (userId: string) => string;
  version: () => unknown;
  mayReply: boolean;
}) {
  // keyed by id (as on the memos screen): a change elsewhere in the memos must not rebuild an item and lose a reply being typed
  const ids = createMemo(() => props.notes.map((m) => m.id), [], { equals: (a, b) => a.length === b.length && a.every((x, i) => x === b[i]) });
  const byId = createMemo(() => new Map(props.notes.map((m) => [m.id, m])));
  return (
    <section class="notes-here" aria-labelledby="notes-here-h" data-testid="notes-here">
      <h2 id="notes-here-h">{props.notes.length === 1 ? (props.notes[0]!.kind === 'jotting' ? 'Jotting' : 'Memo') : 'Jottings and memos'} on {props.on}</h2>
      <ul class="memo-list">
        <For each={ids()}>
          {(id) => {
            let last: MemoView;
            const m = () => (last = byId().get(id) ?? last);
            return (
            <li class="memo" data-kind={m().kind} data-testid="note-here">
              <div class="memo-head">
                <span class="tag">{m().kind}</span> <Show when={m().title}><strong>{m().title}</strong></Show>
                <span class="muted"> — {props.nameOf(m().author)}, {new Date(m().createdAt).toLocaleDateString()}</span>
              </div>
              <p class="memo-body">{m().body}</p>
              <Thread memo={m()} mm={props.mm} me={props.me} nameOf={props.nameOf} version={props.version} mayReply={props.mayReply} />
            </li>
          ); }}
        </For>
      </ul>
    </section>
  );
}
