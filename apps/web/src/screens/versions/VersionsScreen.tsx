import { createMemo, createResource, createSignal, For, Show } from 'solid-js';
import { api } from '../../api/client.js';
import { setupApi, type VersionDetail } from '../../api/setup-api.js';
import { createSubmit, when } from '../../ui/forms.js';
import { Loading } from '../../ui/Loading.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav, allowed } from '../study/StudyNav.js';
import { codebookText, diffRuns, type Run } from './diff-runs.js';

const NOW = 'now';

/** Named versions of the codebook and of each text: name one, list them with who made each, compare two. */
export function VersionsScreen(props: { studyId: string; scope: StudyScope }) {
  const [texts] = createResource(() => props.studyId, (id) => api.texts(id));
  const docs = createMemo(() => {
    const s = props.scope.study();
    return [
      ...(s ? [{ room: s.codebookRoom, label: 'Codebook', kind: 'codebook' as const }] : []),
      ...(texts() ?? []).map((t) => ({ room: t.room, label: t.title, kind: 'text' as const })),
    ];
  });
  const [room, setRoom] = createSignal('');
  const current = () => docs().find((d) => d.room === room()) ?? docs()[0];
  const [list, { refetch }] = createResource(() => current()?.room, (r) => setupApi.versions(r));
  const canName = () => (current()?.kind === 'codebook' ? allowed(props.scope, 'codebook.write') : allowed(props.scope, 'text.correct'));
  const [name, setName] = createSignal('');
  const naming = createSubmit();
  const [a, setA] = createSignal('');
  const [b, setB] = createSignal(NOW);
  const [compared, setCompared] = createSignal<{ runs?: Run[]; vsNow?: VersionDetail; titleA: string; titleB: string }>();
  const comparing = createSubmit();

  const nameOne = (e: Event) => {
    e.preventDefault();
    void naming.run(async () => {
      await setupApi.nameVersion(current()!.room, name());
      setName('');
      await refetch();
    });
  };
  const render = (d: VersionDetail) => (d.kind === 'codebook' ? codebookText((d.then.codes ?? []) as never) : d.then.text ?? '');
  const compare = (e: Event) => {
    e.preventDefault();
    void comparing.run(async () => {
      const r = current()!.room;
      const va = await setupApi.version(r, a());
      const label = (id: string) => list()?.find((v) => v.id === id)?.name ?? id;
      if (b() === NOW) {
        setCompared({ vsNow: va, titleA: label(a()), titleB: 'now' });
        return;
      }
      const vb = await setupApi.version(r, b());
      setCompared({ runs: diffRuns(render(va), render(vb)), titleA: label(a()), titleB: label(b()) });
    });
  };

  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="versions" />
      <h2>Versions</h2>
      <p class="muted">A named version keeps a document as it was, to look back and compare. Owners and leads name versions; everyone in the study can read them.</p>
      <label class="inline">
        Document
        <select value={current()?.room ?? ''} onChange={(e) => { setRoom(e.currentTarget.value); setCompared(undefined); setA(''); setB(NOW); }}>
          <For each={docs()}>{(d) => <option value={d.room}>{d.kind === 'codebook' ? 'Codebook' : `Text: ${d.label}`}</option>}</For>
        </select>
      </label>
      <Loading loading={list.loading} error={list.error} what="the versions">
        <Show
          when={(list() ?? []).length > 0}
          fallback={<p class="empty" data-testid="no-versions">No named versions of this document yet.{canName() ? ' Name the current state below, for example before a round of corrections.' : ''}</p>}
        >
          <table class="versions" aria-label="Named versions">
            <thead><tr><th scope="col">Name</th><th scope="col">Made by</th><th scope="col">When</th></tr></thead>
            <tbody>
              <For each={list()}>{(v) => <tr><td>{v.name}</td><td>{v.createdBy?.name ?? 'a former member'}</td><td><time datetime={v.createdAt}>{when(v.createdAt)}</time></td></tr>}</For>
            </tbody>
          </table>
          <form class="inline-form" aria-label="Compare versions" onSubmit={compare}>
            <label>Compare
              <select required value={a()} onChange={(e) => setA(e.currentTarget.value)}>
                <option value="">choose a version</option>
                <For each={list()}>{(v) => <option value={v.id}>{v.name}</option>}</For>
              </select>
            </label>
            <label>with
              <select value={b()} onChange={(e) => setB(e.currentTarget.value)}>
                <option value={NOW}>the current state</option>
                <For each={list()}>{(v) => <option value={v.id}>{v.name}</option>}</For>
              </select>
            </label>
            <button type="submit" disabled={comparing.busy() || !a()}>Compare</button>
          </form>
        </Show>
        <Show when={canName()}>
          <form class="inline-form" aria-label="Name a version" onSubmit={nameOne}>
            <label>Name the current state<input required maxLength={200} value={name()} onInput={(e) => setName(e.currentTarget.value)} placeholder="e.g. after the second round" /></label>
            <button type="submit" disabled={naming.busy()}>Name version</button>
          </form>
        </Show>
        <Show when={naming.error()}><p class="error" role="alert">{naming.error()}</p></Show>
        <Show when={comparing.error()}><p class="error" role="alert">{comparing.error()}</p></Show>
      </Loading>
      <Show when={compared()}>
        {(c) => (
          <section aria-label="Comparison" class="comparison">
            <h3>“{c().titleA}” → {c().titleB === 'now' ? 'now' : `“${c().titleB}”`}</h3>
            <p class="muted">Removed words are struck through; added words are underlined.</p>
            <Show when={c().runs}>
              <p class="diff" data-testid="word-diff">
                <For each={c().runs}>{(r) => (r.kind === 'same' ? <span>{r.text} </span> : r.kind === 'added' ? <ins>{r.text} </ins> : <del>{r.text} </del>)}</For>
              </p>
            </Show>
            <Show when={c().vsNow}>{(d) => <VsNow detail={d()} />}</Show>
          </section>
        )}
      </Show>
    </main>
  );
}

/** A version against the current state, from the server's own record of the change (text) or code by code (codebook). */
function VsNow(props: { detail: VersionDetail }) {
  const cmp = () => props.detail.comparison as VersionDetail['comparison'] & { added?: Array<{ label: string; text?: string }>; removed?: Array<{ label: string; text?: string }>; changed?: Array<{ label: string; field: string; then: unknown; now: unknown }> };
  return (
    <Show
      when={props.detail.kind === 'text'}
      fallback={
        <ul data-testid="codebook-changes">
          <For each={cmp().added ?? []}>{(x) => <li>Added code <ins>{x.label}</ins></li>}</For>
          <For each={cmp().removed ?? []}>{(x) => <li>Removed code <del>{x.label}</del></li>}</For>
          <For each={cmp().changed ?? []}>{(x) => <li>{x.label}, {x.field}: <del>{String(x.then ?? '')}</del> → <ins>{String(x.now ?? '')}</ins></li>}</For>
          <Show when={!(cmp().added?.length || cmp().removed?.length || cmp().changed?.length)}><li>No change since this version.</li></Show>
        </ul>
      }
    >
      <p>{cmp().text?.wordsAdded ?? 0} words added, {cmp().text?.wordsRemoved ?? 0} removed since this version.</p>
      <ul data-testid="text-changes">
        <For each={cmp().text?.removed ?? []}>{(x) => <li>Removed: <del>{x.text}</del></li>}</For>
        <For each={cmp().text?.added ?? []}>{(x) => <li>Added: <ins>{x.text}</ins></li>}</For>
      </ul>
    </Show>
  );
}
