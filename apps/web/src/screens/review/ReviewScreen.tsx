/**
 * Review: feedback threads addressed to me, and one layer compared with a reference layer segment by
 * segment (missed, extra, other code, other boundary), with a thread started on any place found.
 * The server decides who may read which layer and comment; its refusals are shown as they come.
 */
import { For, Index, Show, createResource, createSignal, createUniqueId, onCleanup } from 'solid-js';
import { getCodes } from '@gloss/model';
import { api } from '../../api/client.js';
import { errorMessage } from '../../api/errors.js';
import type { Me } from '../../api/types.js';
import { href } from '../../ui/router.js';
import { useY } from '../../ui/use-ydoc.js';
import type { OpenDoc } from '../../sync/open-doc.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { reviewApi, watchComments, type Category, type Comparison, type ComparisonEntry, type Thread } from './review-api.js';
import { SideBySide, jump, placeId } from './SideBySide.js';

const CATEGORIES: Array<{ key: Category; title: string }> = [
  { key: 'missed', title: 'Missed' },
  { key: 'extra', title: 'Extra' },
  { key: 'otherCode', title: 'Other code' },
  { key: 'otherBoundary', title: 'Other boundary' },
];

export function ReviewScreen(props: { studyId: string; scope: StudyScope; me: Me }) {
  return (
    <main class="page review-page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="review" />
      <Show when={props.scope.codebook()} keyed fallback={<p class="progress">Opening the codebook…</p>}>
        {(cb) => <Review cb={cb} {...props} />}
      </Show>
    </main>
  );
}

function Review(props: { cb: OpenDoc; studyId: string; scope: StudyScope; me: Me }) {
  const codes = useY(props.cb.doc.getMap('codes'), () => getCodes(props.cb.doc));
  const label = (id: string) => codes().find((c) => c.id === id)?.label ?? 'a code no longer in the codebook';
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const nameOf = (id: string) => (id === props.me.id ? 'you' : members()?.find((m) => m.userId === id)?.name ?? 'a coder');

  const [feedback, { refetch }] = createResource(() => props.studyId, (id) => reviewApi.feedback(id));
  const [changes, setChanges] = createSignal(0);
  onCleanup(
    watchComments(props.studyId, () => {
      void refetch();
      setChanges((n) => n + 1);
    }),
  );

  return (
    <>
      <section aria-labelledby="feedback-h">
        <h2 id="feedback-h">Feedback for you</h2>
        <p class="muted">Threads on your segments that others started, and threads you wrote in that someone answered. New replies appear here as they are written.</p>
        <Show when={!feedback.error} fallback={<p role="alert">Could not load your feedback: {errorMessage(feedback.error)}</p>}>
          <ul class="thread-list">
            {/* Index, not For: a refetch brings new objects, and each thread keeps its draft and message by place. */}
            <Index each={feedback()} fallback={<li class="muted">{feedback.loading ? 'Loading…' : 'Nothing for you yet.'}</li>}>
              {(t) => <ThreadView thread={t()} studyId={props.studyId} meId={props.me.id} nameOf={nameOf} onChanged={() => void refetch()} />}
            </Index>
          </ul>
        </Show>
      </section>
      <ComparePanel studyId={props.studyId} label={label} nameOf={nameOf} changes={changes} meId={props.me.id} />
    </>
  );
}

function ThreadView(props: { thread: Thread; studyId: string; meId: string; nameOf: (id: string) => string; onChanged: () => void }) {
  const [draft, setDraft] = createSignal('');
  const [message, setMessage] = createSignal('');
  const replyId = createUniqueId();
  const t = () => props.thread;
  const act = async (f: () => Promise<unknown>, done: string) => {
    try {
      await f();
      setMessage(done);
      props.onChanged();
    } catch (err) {
      setMessage(`Not saved: ${errorMessage(err)}`);
    }
  };
  return (
    <li class="thread" data-resolved={t().resolvedAt ? 'yes' : 'no'}>
      <p class="thread-where">
        <Show when={t().textTitle}>{(title) => <a href={href({ name: 'coding', studyId: props.studyId, textId: t().textId })}>{title()}</a>}</Show>
        {' · '}segment of {props.nameOf(t().coderId)}
        {t().resolvedAt ? ' · resolved' : ''}
      </p>
      <Show when={t().quote !== null} fallback={<p class="muted">The segment has been removed since.</p>}>
        <blockquote>{t().quote}</blockquote>
      </Show>
      <ol class="comments">
        <For each={[t(), ...t().replies]}>
          {(c) => (
            <li>
              <strong>{c.author.id === props.meId ? 'You' : c.author.name}</strong>{' '}
              <time dateTime={c.createdAt} class="muted">{new Date(c.createdAt).toLocaleString()}</time>
              <p class="comment-body">{c.body}</p>
            </li>
          )}
        </For>
      </ol>
      <form
        class="reply"
        onSubmit={(e) => {
          e.preventDefault();
          const body = draft().trim();
          if (!body) return setMessage('Write a reply first.');
          void act(() => reviewApi.reply(t().textId, t().id, body).then(() => setDraft('')), 'Reply saved.');
        }}
      >
        <label for={replyId}>Reply</label>
        <textarea id={replyId} rows={2} value={draft()} onInput={(e) => setDraft(e.currentTarget.value)} />
        <div class="row">
          <button type="submit">Send reply</button>
          <button type="button" class="secondary" onClick={() => void act(() => reviewApi.setResolved(t().id, !t().resolvedAt), t().resolvedAt ? 'Thread re-opened.' : 'Thread resolved.')}>
            {t().resolvedAt ? 'Re-open' : 'Resolve'}
          </button>
        </div>
      </form>
      <p class="message" role="status">{message()}</p>
    </li>
  );
}

/** A comparison to open at once (the supervision screen's review of one assignment). */
export interface ComparePreset {
  textId: string;
  layer: string;
  reference: string;
  tolerance: number;
}

export function ComparePanel(props: { studyId: string; label: (id: string) => string; nameOf: (id: string) => string; changes: () => number; meId: string; preset?: ComparePreset }) {
  const [texts] = createResource(() => props.studyId, (id) => api.texts(id));
  const [textId, setTextId] = createSignal(props.preset?.textId ?? '');
  const [detail] = createResource(textId, (id) => (id ? api.text(id) : undefined));
  const [layer, setLayer] = createSignal(props.preset?.layer ?? '');
  const [reference, setReference] = createSignal(props.preset?.reference ?? '');
  const [tolerance, setTolerance] = createSignal(props.preset?.tolerance ?? 1);
  const [result, setResult] = createSignal<Comparison | null>(null);
  const [message, setMessage] = createSignal('');
  const [threads, { refetch: refetchThreads }] = createResource(
    () => (result() ? [textId(), props.changes()] as const : undefined),
    ([id]) => reviewApi.threads(id),
  );
  const layerName = (room: string) => {
    const l = detail()?.layers.find((x) => x.room === room);
    return l ? (l.mine ? 'your layer' : `${l.name ?? props.nameOf(l.coderId)}’s layer`) : 'a layer';
  };

  const compare = async () => {
    if (!textId() || !layer() || !reference()) return setMessage('Choose a text, a layer and a reference first.');
    if (layer() === reference()) return setMessage('Choose two different layers.');
    setMessage('Comparing…');
    try {
      setResult(await reviewApi.compare(textId(), layer(), reference(), tolerance()));
      setMessage('');
    } catch (err) {
      setResult(null);
      setMessage(`Could not compare: ${errorMessage(err)}`);
    }
  };
  if (props.preset) void compare();

  return (
    <section aria-labelledby="compare-h" class="compare">
      <h2 id="compare-h">Compare a layer with a reference</h2>
      <form
        class="compare-form"
        onSubmit={(e) => {
          e.preventDefault();
          void compare();
        }}
      >
        <label for="review-text">Text</label>
        <select id="review-text" value={textId()} onChange={(e) => { setTextId(e.currentTarget.value); setLayer(''); setReference(''); setResult(null); }}>
            <option value="">Choose a text</option>
            <For each={texts()}>{(t) => <option value={t.id} selected={t.id === textId()}>{t.title}</option>}</For>
        </select>
        <label for="review-layer">Layer to review</label>
        <select id="review-layer" value={layer()} onChange={(e) => setLayer(e.currentTarget.value)} disabled={!detail()}>
            <option value="">Choose a layer</option>
            <For each={detail()?.layers}>{(l) => <option value={l.room} selected={l.room === layer()}>{layerName(l.room)}</option>}</For>
        </select>
        <label for="review-reference">Reference</label>
        <select id="review-reference" value={reference()} onChange={(e) => setReference(e.currentTarget.value)} disabled={!detail()}>
            <option value="">Choose the reference</option>
            <For each={detail()?.layers}>{(l) => <option value={l.room} selected={l.room === reference()}>{layerName(l.room)}</option>}</For>
        </select>
        <label for="review-tolerance">Boundary tolerance (words)</label>
        <input id="review-tolerance" type="number" min="0" max="50" value={tolerance()} onInput={(e) => setTolerance(Math.max(0, Math.floor(Number(e.currentTarget.value) || 0)))} />
        <button type="submit">Compare</button>
      </form>
      <p class="message" role="status">{message()}</p>
      <Show when={result()}>
        {(r) => (
          <>
            <details class="definitions">
              <summary>What the categories mean</summary>
              <dl>
                <For each={CATEGORIES}>{(c) => <><dt>{c.title}</dt><dd>{r().definitions[c.key]}</dd></>}</For>
                <dt>Overlap</dt>
                <dd>{r().definitions.overlap}</dd>
              </dl>
              <p class="muted">{r().definitions.source}</p>
            </details>
            <table class="compare-counts">
              <caption>Per code: {layerName(r().layer.room)} against {layerName(r().reference.room)}, tolerance {r().toleranceWords} word{r().toleranceWords === 1 ? '' : 's'}</caption>
              <thead>
                <tr><th scope="col">Code</th><th scope="col">Same</th><For each={CATEGORIES}>{(c) => <th scope="col">{c.title}</th>}</For></tr>
              </thead>
              <tbody>
                <For each={Object.entries(r().counts)} fallback={<tr><td colSpan={6}>Neither layer has segments on this text.</td></tr>}>
                  {([codeId, n]) => (
                    <tr><th scope="row">{props.label(codeId)}</th><td>{n.matched}</td><td>{n.missed}</td><td>{n.extra}</td><td>{n.otherCode}</td><td>{n.otherBoundary}</td></tr>
                  )}
                </For>
              </tbody>
            </table>
            <SideBySide result={r()} layerName={layerName(r().layer.room)} referenceName={layerName(r().reference.room)} label={props.label} />
            <For each={CATEGORIES}>
              {(c) => (
                <section class="compare-list" aria-label={c.title}>
                  <h3>{c.title} <span class="count">{r()[c.key].length}</span></h3>
                  <ul>
                    <For each={r()[c.key]} fallback={<li class="muted">None.</li>}>
                      {(entry, i) => (
                        <PlaceView
                          id={placeId(c.key, i())}
                          entry={entry}
                          category={c.key}
                          textId={textId()}
                          studyId={props.studyId}
                          layerRoom={r().layer.room}
                          referenceRoom={r().reference.room}
                          label={props.label}
                          threads={threads() ?? []}
                          onCommented={() => void refetchThreads()}
                        />
                      )}
                    </For>
                  </ul>
                </section>
              )}
            </For>
          </>
        )}
      </Show>
    </section>
  );
}

/** One place the comparison found: its words, the codes on both sides, and its comment thread. */
function PlaceView(props: {
  id: string;
  entry: ComparisonEntry;
  category: Category;
  textId: string;
  studyId: string;
  layerRoom: string;
  referenceRoom: string;
  label: (id: string) => string;
  threads: Thread[];
  onCommented: () => void;
}) {
  // A comment goes on the reviewed layer's segment where there is one, else on the reference's.
  const target = () =>
    props.entry.layer[0] ? { layer: props.layerRoom, segmentId: props.entry.layer[0].id } : { layer: props.referenceRoom, segmentId: props.entry.reference!.id };
  const thread = () => props.threads.find((t) => t.layer === target().layer && t.segmentId === target().segmentId);
  const fieldId = createUniqueId();
  const [draft, setDraft] = createSignal('');
  const [message, setMessage] = createSignal('');
  const describe = () => {
    const e = props.entry;
    switch (props.category) {
      case 'missed': return `Reference: ${props.label(e.codeIds[0]!)}; nothing in the layer.`;
      case 'extra': return `Layer: ${props.label(e.codeIds[0]!)}; nothing of that code in the reference.`;
      case 'otherCode': return `Reference: ${props.label(e.codeIds[0]!)}; layer: ${e.codeIds.slice(1).map(props.label).join(', ')}.`;
      case 'otherBoundary': return `${props.label(e.codeIds[0]!)}: the start lies ${e.startShiftWords} word(s) and the end ${e.endShiftWords} word(s) from the reference’s.`;
    }
  };
  const send = async () => {
    const body = draft().trim();
    if (!body) return setMessage('Write a comment first.');
    try {
      const t = thread();
      if (t) await reviewApi.reply(props.textId, t.id, body);
      else await reviewApi.startThread(props.textId, target().layer, target().segmentId, body);
      setDraft('');
      setMessage('Comment saved.');
      props.onCommented();
    } catch (err) {
      setMessage(`Not saved: ${errorMessage(err)}`);
    }
  };
  return (
    <li class="place" data-category={props.category} id={props.id}>
      <blockquote>{props.entry.quote}</blockquote>
      <p>
        {describe()} <a href={href({ name: 'coding', studyId: props.studyId, textId: props.textId })}>Open the text</a>{' · '}
        <a href={`#sbs-${props.id}`} onClick={(e) => { e.preventDefault(); jump(`sbs-${props.id}`); }}>Side by side</a>
      </p>
      <Show when={thread()}>
        {(t) => (
          <ol class="comments">
            <For each={[t(), ...t().replies]}>{(c) => <li><strong>{c.author.name}</strong>: {c.body}</li>}</For>
          </ol>
        )}
      </Show>
      <form
        class="reply"
        onSubmit={(e) => {
          e.preventDefault();
          void send();
        }}
      >
        <label for={fieldId}>{thread() ? 'Reply' : 'Comment on this place'}</label>
        <textarea id={fieldId} rows={2} value={draft()} onInput={(e) => setDraft(e.currentTarget.value)} />
        <button type="submit">{thread() ? 'Send reply' : 'Add comment'}</button>
      </form>
      <p class="message" role="status">{message()}</p>
    </li>
  );
}
