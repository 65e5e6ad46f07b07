/**
 * Second-cycle actions on one code: merge into another, split into new codes, move under a parent,
 * retire. Each first shows what it would touch (segments per coder and text, loaded from every layer
 * this person can read), and applies only on confirmation.
 */
import { For, Match, Show, Switch, createSignal, onCleanup } from 'solid-js';
import { countOf } from '../../ui/count-words.js';
import type * as Y from 'yjs';
import {
  applyMergeToLayer, applySplitToLayer, mergeCodes, moveCode, previewMerge, previewRetire, previewSplit, retireCode, splitCode,
  type CodeView, type OperationPreview,
} from '@gloss/model';
import { loadStudyLayers, type LoadedLayers } from './study-layers.js';
import { errorMessage } from '../../api/errors.js';

type Action = 'merge' | 'split' | 'move' | 'retire';

export function SecondCycle(props: { studyId: string; codebook: Y.Doc; code: CodeView; codes: CodeView[]; by: string }) {
  const [action, setAction] = createSignal<Action>('merge');
  const [target, setTarget] = createSignal('');
  const [newLabels, setNewLabels] = createSignal('');
  const [reason, setReason] = createSignal('');
  const [progress, setProgress] = createSignal<{ done: number; total: number } | null>(null);
  const [preview, setPreview] = createSignal<OperationPreview | null>(null);
  const [message, setMessage] = createSignal('');
  let loaded: LoadedLayers | undefined;
  onCleanup(() => loaded?.release());

  const others = () => props.codes.filter((c) => c.id !== props.code.id && c.status === 'active');
  const actor = () => ({ by: props.by, ...(reason().trim() ? { reason: reason().trim() } : {}) });

  const makePreview = async () => {
    setMessage('');
    setPreview(null);
    try {
      loaded?.release();
      loaded = await loadStudyLayers(props.studyId, (done, total) => setProgress({ done, total }));
      const l = loaded.segments;
      const p =
        action() === 'merge' ? previewMerge(l, [props.code.id], target())
        : action() === 'split' ? previewSplit(l, props.code.id, new Map())
        : action() === 'retire' ? previewRetire(l, props.code.id)
        : { affected: [], count: 0, perLayer: {}, unassigned: [] };
      setPreview(p);
    } catch (err) {
      setMessage(`Preview failed: ${errorMessage(err)}`);
    } finally {
      setProgress(null);
    }
  };

  const apply = () => {
    try {
      const a = actor();
      if (action() === 'merge') {
        if (!target()) throw new Error('Choose the code to merge into.');
        mergeCodes(props.codebook, [props.code.id], target(), a);
        for (const h of loaded?.writable ?? []) applyMergeToLayer(h.doc, new Map([[props.code.id, target()]]));
        setMessage('Merged. Each coder’s segments follow when their layer is next open.');
      } else if (action() === 'split') {
        const labels = newLabels().split(',').map((s) => s.trim()).filter(Boolean);
        if (labels.length < 2) throw new Error('Give at least two new labels, separated by commas.');
        splitCode(props.codebook, props.code.id, labels.map((label) => ({ label })), new Map(), a);
        for (const h of loaded?.writable ?? []) applySplitToLayer(props.codebook, props.code.id, h.doc);
        setMessage('Split. Segments of the old code are flagged until someone recodes them.');
      } else if (action() === 'move') {
        moveCode(props.codebook, props.code.id, target() || null, a);
        setMessage('Moved.');
      } else {
        retireCode(props.codebook, props.code.id, a);
        setMessage('Retired. Its segments are flagged for recoding.');
      }
      setPreview(null);
    } catch (err) {
      setMessage(`Not done: ${errorMessage(err)}`);
    }
  };

  return (
    <section class="second-cycle" aria-labelledby="sc-h">
      <h3 id="sc-h">Second cycle</h3>
      <div class="row" role="radiogroup" aria-label="Action">
        <For each={['merge', 'split', 'move', 'retire'] as Action[]}>
          {(a) => (
            <label class="check">
              <input type="radio" name="sc-action" value={a} checked={action() === a} onChange={() => { setAction(a); setPreview(null); setTarget(''); }} /> {a}
            </label>
          )}
        </For>
      </div>
      <Switch>
        <Match when={action() === 'merge'}>
          <label>Merge “{props.code.label}” into
            <select value={target()} onChange={(e) => { setTarget(e.currentTarget.value); setPreview(null); }}>
              <option value="">(choose a code)</option>
              <For each={others()}>{(c) => <option value={c.id}>{c.label}</option>}</For>
            </select>
          </label>
        </Match>
        <Match when={action() === 'split'}>
          <label>New codes (comma-separated labels)
            <input value={newLabels()} onInput={(e) => setNewLabels(e.currentTarget.value)} />
          </label>
        </Match>
        <Match when={action() === 'move'}>
          <label>Move under
            <select value={target()} onChange={(e) => setTarget(e.currentTarget.value)}>
              <option value="">(top level)</option>
              <For each={others()}>{(c) => <option value={c.id}>{c.label}</option>}</For>
            </select>
          </label>
        </Match>
      </Switch>
      <label>Why (kept in the change history) <input value={reason()} onInput={(e) => setReason(e.currentTarget.value)} /></label>
      <div class="row">
        <Show when={action() !== 'move'}>
          <button type="button" class="quiet" disabled={action() === 'merge' && !target()} onClick={() => void makePreview()}>Preview affected segments</button>
        </Show>
        <button type="button" disabled={action() !== 'move' && !preview()} onClick={apply} data-testid="apply-second-cycle">Apply {action()}</button>
      </div>
      <Show when={progress()}>
        {(p) => <p class="progress" role="progressbar" aria-valuemin={0} aria-valuemax={p().total} aria-valuenow={p().done}>Reading layers: {p().done} of {p().total}…</p>}
      </Show>
      <Show when={preview()}>
        {(p) => (
          <div class="preview" data-testid="preview" aria-live="polite">
            <p><strong>{countOf(p().count, 'segment')}</strong> affected{p().unassigned.length ? `, ${p().unassigned.length} left needing a new code` : ''}.</p>
            <ul>
              <For each={Object.entries(p().perLayer)}>{([room, n]) => <li>{loaded?.labels.get(room) ?? room}: {n}</li>}</For>
            </ul>
          </div>
        )}
      </Show>
      <p role="status" class="message">{message()}</p>
    </section>
  );
}
