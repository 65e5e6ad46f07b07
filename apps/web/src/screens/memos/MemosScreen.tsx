/**
 * Memos and jottings of the study: search, filter, write, edit one's own, promote a jotting to a memo,
 * and reply: each memo's replies show as a thread under it (a reply is an entry of its writer's own).
 */
import { For, Show, createMemo, createResource, createSignal, onCleanup, onMount } from 'solid-js';
import { personName } from '../../ui/person-name.js';
import {
  addMemo, getCodes, getMemoBody, listMemos, promoteJotting, removeMemo, searchMemos,
  type MemoAttachment, type MemoView,
} from '@gloss/model';
import { decide } from '../coding/coding-actions.js';
import { Thread } from './MemoThread.js';
import type { Me } from '../../api/types.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { useY } from '../../ui/use-ydoc.js';
import { href } from '../../ui/router.js';
import { api } from '../../api/client.js';
import { createAttempt } from '../../ui/attempt.js';
import { bindField } from '../../ui/ytext-binding.js';
import type { OpenDoc } from '../../sync/open-doc.js';

export function MemosScreen(props: { studyId: string; scope: StudyScope; me: Me }) {
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="memos" />
      <p class="data-notice">Memos can leak identifiers: write about participants by pseudonym only.</p>
      <Show when={props.scope.memos() && props.scope.codebook() ? [props.scope.memos()!, props.scope.codebook()!] as const : undefined} keyed fallback={<p class="progress">Opening the memos…</p>}>
        {([mm, cb]) => <Memos mm={mm} cb={cb} {...props} />}
      </Show>
    </main>
  );
}

function Memos(props: { mm: OpenDoc; cb: OpenDoc; studyId: string; scope: StudyScope; me: Me }) {
  const doc = props.mm.doc;
  const all = useY(doc.getMap('memos'), () => listMemos(doc));
  const codes = useY(props.cb.doc.getMap('codes'), () => getCodes(props.cb.doc));
  const [texts] = createResource(() => props.studyId, (id) => api.texts(id).catch(() => []));
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const nameOf = (id: string) => (id === props.me.id ? 'you' : personName(members(), id));
  const [query, setQuery] = createSignal('');
  const [kind, setKind] = createSignal<'' | 'memo' | 'jotting'>('');
  const [open, setOpen] = createSignal<string | null>(null);
  const { message, attempt } = createAttempt();
  // one rule for writing memos, replies included (the coding view's role table; the server enforces it)
  const mayReply = () => decide(props.scope.study()?.role, 'reply', { permissions: props.scope.study()?.permissions });
  const shown = createMemo(() => {
    all();
    const filter = kind() ? { kind: kind() as 'memo' | 'jotting' } : {};
    return query().trim() ? searchMemos(doc, query(), filter).map((h) => h.memo) : listMemos(doc, filter).reverse();
  });
  // the list is keyed by id, so a change elsewhere in the memos does not rebuild an item (and lose a reply being typed)
  const shownIds = createMemo(() => shown().map((m) => m.id), [], { equals: (a, b) => a.length === b.length && a.every((x, i) => x === b[i]) });
  const byId = createMemo(() => new Map(shown().map((m) => [m.id, m])));
  const where = (a: MemoAttachment) => {
    switch (a.kind) {
      case 'study': return 'the study';
      case 'text': return `${a.start ? 'words in ' : ''}text “${texts()?.find((t) => t.id === a.textId)?.title ?? 'a text'}”`;
      case 'segment': return `a segment in “${texts()?.find((t) => t.id === a.textId)?.title ?? 'a text'}”`;
      case 'code': return `code “${codes().find((c) => c.id === a.codeId)?.label ?? 'a code'}”`;
    }
  };

  // new memo form
  const [title, setTitle] = createSignal('');
  const [body, setBody] = createSignal('');
  const [attach, setAttach] = createSignal('study');
  const attachment = (): MemoAttachment => {
    const [k, id] = attach().split(':');
    if (k === 'text' && id) return { kind: 'text', textId: id };
    if (k === 'code' && id) return { kind: 'code', codeId: id };
    return { kind: 'study' };
  };

  return (
    <div class="memos">
      <section aria-labelledby="memo-list-h">
        <h2 id="memo-list-h">Memos and jottings</h2>
        <div class="row">
          <label>Search <input type="search" value={query()} onInput={(e) => setQuery(e.currentTarget.value)} data-testid="memo-search" /></label>
          <label>Show
            <select value={kind()} onChange={(e) => setKind(e.currentTarget.value as never)}>
              <option value="">all</option><option value="memo">memos</option><option value="jotting">jottings</option>
            </select>
          </label>
        </div>
        <Show when={message()}><p class="error" role="alert">{message()}</p></Show>
        <ul class="memo-list">
          <For each={shownIds()} fallback={<li class="muted">No memos match.</li>}>
            {(id) => {
              // the last known view stays while an item being removed is torn down
              let last: MemoView;
              const m = () => (last = byId().get(id) ?? last);
              return (
              <li class="memo" data-kind={m().kind}>
                <div class="memo-head">
                  <span class="tag">{m().replyTo ? 'reply' : m().kind}</span> <strong>{m().replyTo ? '(a reply; the memo it answered was deleted)' : m().title || '(untitled)'}</strong>
                  <span class="muted"> — {nameOf(m().author)}, on {where(m().attachedTo)}, {new Date(m().createdAt).toLocaleDateString()}</span>
                </div>
                <Show when={open() === m().id} fallback={<p class="memo-body">{m().body.slice(0, 280)}{m().body.length > 280 ? '…' : ''}</p>}>
                  <MemoBody memo={m()} doc={doc} mine={m().author === props.me.id} />
                </Show>
                <div class="row">
                  <Show when={m().attachedTo.kind === 'segment' || m().attachedTo.kind === 'text' ? m().attachedTo : undefined}>
                    {(a) => <a class="button-link" href={href({ name: 'coding', studyId: props.studyId, textId: (a() as { textId: string }).textId, ...('segmentId' in a() ? { segmentId: (a() as { segmentId: string }).segmentId } : 'start' in a() ? { memoId: m().replyTo ?? m().id } : {}) })}>Go to the passage</a>}
                  </Show>
                  <button type="button" class="quiet" onClick={() => setOpen(open() === m().id ? null : m().id)} aria-expanded={open() === m().id}>{open() === m().id ? 'Close' : m().author === props.me.id ? 'Open and edit' : 'Read'}</button>
                  <Show when={m().author === props.me.id && m().kind === 'jotting'}>
                    <button type="button" class="quiet" onClick={() => attempt(() => promoteJotting(doc, m().id))}>Promote to memo</button>
                  </Show>
                  <Show when={m().author === props.me.id}>
                    <button type="button" class="danger" onClick={() => confirm('Delete this memo?') && attempt(() => removeMemo(doc, m().id))}>Delete</button>
                  </Show>
                </div>
                <Show when={!m().replyTo}>
                  <Thread memo={m()} mm={props.mm} me={props.me} nameOf={nameOf} version={all} mayReply={mayReply().allowed} />
                </Show>
              </li>
            ); }}
          </For>
        </ul>
      </section>
      <section aria-labelledby="new-memo-h" class="new-memo">
        <h2 id="new-memo-h">New memo</h2>
        <Show when={mayReply().allowed} fallback={<p class="muted" data-testid="memos-read-only">You can read the memos and their replies here; your role does not write memos.</p>}>
        <form onSubmit={(e) => {
          e.preventDefault();
          attempt(() => {
            addMemo(doc, { kind: 'memo', author: props.me.id, title: title(), body: body(), attachedTo: attachment() });
            setTitle('');
            setBody('');
          });
        }}>
          <label>Title <input value={title()} onInput={(e) => setTitle(e.currentTarget.value)} required /></label>
          <label>About
            <select value={attach()} onChange={(e) => setAttach(e.currentTarget.value)}>
              <option value="study">the study</option>
              <For each={texts() ?? []}>{(t) => <option value={`text:${t.id}`}>text: {t.title}</option>}</For>
              <For each={codes()}>{(c) => <option value={`code:${c.id}`}>code: {c.label}</option>}</For>
            </select>
          </label>
          <label>Memo <textarea rows="6" value={body()} onInput={(e) => setBody(e.currentTarget.value)} /></label>
          <button type="submit">Keep memo</button>
        </form>
        </Show>
      </section>
    </div>
  );
}

function MemoBody(props: { memo: MemoView; doc: OpenDoc['doc']; mine: boolean }) {
  let el!: HTMLTextAreaElement;
  onMount(() => onCleanup(bindField(el, getMemoBody(props.doc, props.memo.id), { readOnly: !props.mine })));
  return <label>Body <textarea ref={el} rows="8" class="memo-editor" /></label>;
}
