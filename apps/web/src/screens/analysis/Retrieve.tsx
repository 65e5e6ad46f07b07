/** Retrieval: every segment of a code (optionally with the codes under it) across the study, filtered, in context, paged by the server. */
import { createEffect, createResource, createSignal, For, on, Show } from 'solid-js';
import { analysisApi, type Query, type TableOut } from '../../api/analysis.js';
import { errorMessage } from '../../api/errors.js';
import { href } from '../../ui/router.js';

export interface Filters {
  code?: string;
  descendants?: boolean;
  coder?: string;
  /** coders' layers only, or rounds' consensus layers only (default: every readable layer) */
  source?: 'coders' | 'consensus';
  round?: number;
  text?: string;
  speaker?: string;
  case?: string;
  attribute?: string;
  value?: string;
  with?: string;
  mode?: 'overlap' | 'unit';
  sort?: 'text' | 'coded' | 'code';
  /** What the filters came from (a table cell), said above the results. */
  origin?: string;
}

const PAGE = 25;

export function Retrieve(props: { studyId: string; filters: Filters; onFilters: (f: Filters) => void; changes?: number }) {
  const [offset, setOffset] = createSignal(0);
  const [facets, { refetch: refetchFacets }] = createResource(() => ({ id: props.studyId, changes: props.changes }), ({ id }) => analysisApi.table(id, { kind: 'frequency' }));
  createEffect(on(() => props.filters, () => setOffset(0), { defer: true }));
  const query = () => {
    const f = props.filters;
    const q: Query = { code: f.code, descendants: f.descendants, coder: f.coder, source: f.source, round: f.round, text: f.text, speaker: f.speaker, case: f.case, with: f.with, mode: f.mode, sort: f.sort, limit: PAGE, offset: offset() };
    if (f.attribute) Object.assign(q, { attribute: f.attribute, value: f.value ?? '' });
    return q;
  };
  const [result] = createResource(() => ({ id: props.studyId, q: query(), changes: props.changes }), ({ id, q }) => analysisApi.retrieve(id, q));
  // the lists on offer come from the projection, which may still be catching up (a study just imported):
  // when the segments found outnumber what the lists know of, read the lists again
  createEffect(
    on(result, (r) => {
      const f = facets();
      if (r && f && r.total > f.cells.reduce((n, c) => n + (c[0] ?? 0), 0)) void refetchFacets();
    }),
  );
  const set = (patch: Partial<Filters>) => props.onFilters({ ...props.filters, origin: undefined, ...patch });
  const label = (id: string | undefined) => facets()?.rows.find((r) => r.id === id)?.label ?? id;
  return (
    <div class="retrieve">
      <form class="filters" aria-label="Retrieval filters" onSubmit={(e) => e.preventDefault()}>
        <label>
          Code
          <select value={props.filters.code ?? ''} onChange={(e) => set({ code: e.currentTarget.value || undefined, with: undefined })}>
            <option value="">every code</option>
            <For each={facets()?.rows ?? []}>{(r, i) => <option value={r.id} selected={r.id === props.filters.code}>{r.label} ({facets()!.cells[i()]![0]})</option>}</For>
          </select>
        </label>
        <label class="check">
          <input type="checkbox" checked={Boolean(props.filters.descendants)} onChange={(e) => set({ descendants: e.currentTarget.checked })} /> with the codes under it
        </label>
        <label>
          Coder
          <select value={props.filters.coder ?? ''} onChange={(e) => set({ coder: e.currentTarget.value || undefined })}>
            <option value="">everyone</option>
            <For each={facets()?.coders ?? []}>{(c) => <option value={c.id} selected={c.id === props.filters.coder}>{c.name}</option>}</For>
          </select>
        </label>
        <SourceAndRound filters={props.filters} rounds={facets()?.rounds ?? []} onChange={set} />
        <label>
          Text
          <select value={props.filters.text ?? ''} onChange={(e) => set({ text: e.currentTarget.value || undefined })}>
            <option value="">every text</option>
            <For each={facets()?.texts ?? []}>{(t) => <option value={t.id} selected={t.id === props.filters.text}>{t.title}</option>}</For>
          </select>
        </label>
        <label>
          Speaker
          <select value={props.filters.speaker ?? ''} onChange={(e) => set({ speaker: e.currentTarget.value || undefined })}>
            <option value="">any speaker</option>
            <For each={facets()?.speakers ?? []}>{(s) => <option value={s} selected={s === props.filters.speaker}>{s}</option>}</For>
          </select>
        </label>
        <label>
          Case
          <select value={props.filters.case ?? ''} onChange={(e) => set({ case: e.currentTarget.value || undefined })}>
            <option value="">any case</option>
            <For each={facets()?.cases ?? []}>{(c) => <option value={c.id} selected={c.id === props.filters.case}>{c.name}</option>}</For>
          </select>
        </label>
        <label>
          Sort
          <select value={props.filters.sort ?? 'text'} onChange={(e) => set({ sort: e.currentTarget.value as Filters['sort'] })}>
            <option value="text">by text and place</option>
            <option value="code">by code</option>
            <option value="coded">newest coding first</option>
          </select>
        </label>
      </form>
      <Show when={props.filters.origin || props.filters.with || props.filters.attribute}>
        <p class="drill-note">
          {props.filters.origin ?? 'Filtered'}
          <Show when={props.filters.with}>{' '}— segments of {label(props.filters.code)} that co-occur with {label(props.filters.with)} ({props.filters.mode === 'unit' ? 'same speaker turn' : 'overlapping words'})</Show>{' '}
          <button type="button" class="link" onClick={() => props.onFilters({})}>Clear filters</button>
        </p>
      </Show>
      <Show when={!result.error} fallback={<p class="error" role="alert">Could not retrieve the segments: {errorMessage(result.error)}</p>}>
        <Show when={result()} fallback={<p class="progress">Retrieving…</p>}>
          {(r) => (
            <>
              <p aria-live="polite" class="count">
                {r().total === 0 ? 'No segments match.' : `Segments ${r().offset + 1}–${r().offset + r().items.length} of ${r().total}`}
              </p>
              <Show when={r().items.length > 0}>
              <ol class="hits" aria-label="Segments found" start={r().offset + 1}>
                <For each={r().items}>
                  {(s) => (
                    <li class="hit">
                      <blockquote>
                        <Show when={s.context?.clippedBefore}>…</Show>
                        <span class="ctx">{s.context?.before ?? ''}</span>
                        <mark>{s.quote}</mark>
                        <span class="ctx">{s.context?.after ?? ''}</span>
                        <Show when={s.context?.clippedAfter}>…</Show>
                      </blockquote>
                      <p class="meta">
                        <span class="tag">{s.codeLabel}</span> {s.speaker ? <span>{s.speaker} · </span> : null}
                        {s.kind === 'consensus' ? s.coderName : `coded by ${s.coderName || 'a former member'}`}
                        {s.kind !== 'consensus' && s.round !== null ? ` (round ${s.round})` : ''} ·{' '}
                        <a href={href({ name: 'coding', studyId: props.studyId, textId: s.textId })}>{s.textTitle}</a>
                        <span class="muted"> (characters {s.start}–{s.end})</span>
                      </p>
                    </li>
                  )}
                </For>
              </ol>
              </Show>
              <nav class="pager" aria-label="Pages of segments">
                <button type="button" class="quiet" disabled={r().offset === 0} onClick={() => setOffset(Math.max(0, offset() - PAGE))}>Previous</button>
                <button type="button" class="quiet" disabled={r().offset + r().items.length >= r().total} onClick={() => setOffset(offset() + PAGE)}>Next</button>
              </nav>
            </>
          )}
        </Show>
      </Show>
    </div>
  );
}

/** Whose segments (every layer, coders' layers, rounds' consensus layers) and which round: shared by retrieval and the tables. */
export function SourceAndRound(props: { filters: Pick<Filters, 'source' | 'round'>; rounds: TableOut['rounds']; onChange: (patch: Pick<Filters, 'source' | 'round'>) => void }) {
  return (
    <>
      <label>
        Layers
        <select value={props.filters.source ?? ''} onChange={(e) => props.onChange({ source: (e.currentTarget.value || undefined) as Filters['source'] })}>
          <option value="">every layer</option>
          <option value="coders" selected={props.filters.source === 'coders'}>coders’ layers</option>
          <option value="consensus" selected={props.filters.source === 'consensus'}>consensus (revealed or closed rounds)</option>
        </select>
      </label>
      <Show when={props.rounds.length > 0}>
        <label>
          Round
          <select value={props.filters.round ?? ''} onChange={(e) => props.onChange({ round: e.currentTarget.value ? Number(e.currentTarget.value) : undefined })}>
            <option value="">any round</option>
            <For each={props.rounds}>
              {(r) => (
                <option value={r.number} selected={r.number === props.filters.round}>
                  Round {r.number}: {r.name} ({r.phase}{r.consensus ? ', consensus' : ''})
                </option>
              )}
            </For>
          </select>
        </label>
      </Show>
    </>
  );
}
