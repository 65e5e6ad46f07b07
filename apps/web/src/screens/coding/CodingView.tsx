/** The coding view proper, once every document is open. */
import { For, Show, createMemo, createSignal, onCleanup, onMount } from 'solid-js';
import * as Y from 'yjs';
import {
  addCode, addExample, addInVivoCode, addMemo, addSegment, correctText, createUndoManager, getSegmentsMap,
  recheckSegment, recodeSegment, removeSegment, resizeSegment, setSegmentNote, listSegments, reconcileLayer, withOrigin, proposeCode,
} from '@gloss/model';
import type { Me } from '../../api/types.js';
import type { StudyScope } from '../study/study-context.js';
import type { OpenDoc } from '../../sync/open-doc.js';
import { useCodingState, type LayerHandle } from './coding-state.js';
import { useRecentCodes } from './recent-codes.js';
import { useTextPresence } from './text-presence.js';
import { Transcript } from './Transcript.js';
import { CodePicker } from './CodePicker.js';
import { SegmentPanel } from './SegmentPanel.js';
import { FlagList } from './FlagList.js';
import { commandFor, KEY_HELP, type Command } from './coding-keys.js';
import { nextWordEnd, ordered, prevWordStart, type Sel } from './keyboard-selection.js';
import { rangeFor } from './dom-selection.js';
import { errorMessage } from '../../api/errors.js';
import { diff } from '../../ui/ytext-binding.js';

export interface CodingViewProps {
  studyId: string;
  textId: string;
  text: OpenDoc;
  layers: LayerHandle[];
  codebook: OpenDoc;
  memos: OpenDoc;
  scope: StudyScope;
  me: Me;
}

export function CodingView(props: CodingViewProps) {
  const [hidden, setHidden] = createSignal<Set<string>>(new Set());
  const visibleLayers = createMemo(() => props.layers.filter((l) => !hidden().has(l.coderId)));
  const role = () => props.scope.study()?.role;
  const isLead = () => role() === 'owner' || role() === 'lead';
  const reflexive = () => props.scope.study()?.mode === 'reflexive';
  const state = useCodingState(props.text, props.layers, visibleLayers, props.codebook, { showDisagreement: () => !reflexive() && props.layers.length > 1 });
  const mine = props.layers.find((l) => l.mine);
  const undo = mine ? createUndoManager(getSegmentsMap(mine.doc.doc) as unknown as Y.AbstractType<unknown>, null, { captureTimeout: 0 }) : undefined;
  onCleanup(() => undo?.destroy());
  const [canUndo, setCanUndo] = createSignal(false);
  const [canRedo, setCanRedo] = createSignal(false);
  const refreshUndo = () => {
    setCanUndo((undo?.undoStack.length ?? 0) > 0);
    setCanRedo((undo?.redoStack.length ?? 0) > 0);
  };
  undo?.on('stack-item-added', refreshUndo);
  undo?.on('stack-item-popped', refreshUndo);

  // Bring my layer up to date with merges and splits made while it was closed or offline
  // (not through undo: the origin is not the one the undo manager tracks).
  if (mine) {
    const reconcile = () => withOrigin(mine.doc.doc, 'reconcile', () => reconcileLayer(props.codebook.doc, mine.doc.doc));
    const codesMap = props.codebook.doc.getMap('codes');
    const onCodes = () => queueMicrotask(reconcile);
    codesMap.observeDeep(onCodes);
    onCleanup(() => codesMap.unobserveDeep(onCodes));
    reconcile();
  }

  const recent = useRecentCodes(props.studyId);
  const presence = useTextPresence(props.text, props.me);
  const [selection, setSelectionSig] = createSignal<Sel | null>(null);
  const setSelection = (s: Sel | null) => {
    setSelectionSig(s);
    presence.publish(s);
  };
  const [chosen, setChosen] = createSignal<string | null>(null);
  const [pickerMode, setPickerMode] = createSignal<'apply' | 'recode'>('apply');
  const [message, setMessage] = createSignal('');
  const [jotting, setJotting] = createSignal<string | null>(null);
  const [correction, setCorrection] = createSignal<string | null>(null);
  const [ready, setReady] = createSignal(false);
  const [layersIn, setLayersIn] = createSignal(false);
  // every layer and the codebook have arrived: mark the frame after they are drawn (the benchmark reads it)
  void Promise.all([props.codebook.whenReady, ...props.layers.map((l) => l.doc.whenReady)]).then(() => {
    setLayersIn(true);
    requestAnimationFrame(() => performance.mark('gloss:layers-drawn'));
  });
  let searchInput: HTMLInputElement | undefined;
  let noteInput: HTMLTextAreaElement | undefined;
  let jotInput: HTMLTextAreaElement | undefined;
  let transcriptEl: HTMLElement | undefined;

  /** Segments flagged `stale-definition` (their coder is offered "re-checked" in the segment panel). */
  const staleIds = createMemo(() => {
    const f = state.flags();
    const ids = new Set<string>();
    for (let i = 0; i < f.length; i++) if (f.kindAt(i) === 'stale-definition') for (const id of f.at(i).segmentIds) ids.add(id);
    return ids;
  });
  const chosenSeg = createMemo(() => (chosen() ? state.segments().find((s) => s.id === chosen()) : undefined));
  const chosenIsMine = () => !!mine && chosenSeg()?.coderId === mine.coderId;
  const sel = () => {
    const s = selection();
    if (!s) return null;
    const o = ordered(s);
    return o.end > o.start ? o : null;
  };
  const laneName = (coderId: string) => props.layers.find((l) => l.coderId === coderId)?.name ?? coderId;

  const attempt = (what: string, f: () => void) => {
    try {
      f();
      setMessage(what);
    } catch (err) {
      setMessage(`Not done: ${errorMessage(err)}`);
    }
  };
  const backToText = () => transcriptEl?.focus();

  const apply = (codeId: string) => {
    if (pickerMode() === 'recode' && chosenIsMine()) {
      attempt('Recoded.', () => recodeSegment(mine!.doc.doc, chosen()!, codeId));
      recent.use(codeId);
      setPickerMode('apply');
      backToText();
      return;
    }
    const s = sel();
    if (!mine) return setMessage('You have no layer on this text, so you cannot code it.');
    if (!s) return setMessage('Select some words first.');
    attempt(`Coded “${state.codeById().get(codeId)?.label ?? ''}”.`, () => {
      const id = addSegment(mine.doc.doc, props.text.doc, { codeId, start: s.start, end: s.end });
      setChosen(id);
    });
    recent.use(codeId);
    backToText();
  };

  const inVivo = () => {
    const s = sel();
    if (!s || !mine) return setMessage('Select the words to use as the code first.');
    const words = state.words().slice(s.start, s.end);
    // Only the lead and owner write codes; anyone else's in vivo code goes to them as a proposal.
    attempt(isLead() ? 'In vivo code added and applied.' : 'In vivo code proposed to the lead and applied; it shows as “(proposed)” until they decide.', () => {
      const codeId = isLead()
        ? addInVivoCode(props.codebook.doc, words, { by: props.me.id })
        : proposeCode(props.codebook.doc, { label: words, inVivo: true, author: props.me.id, textId: props.textId, quote: words });
      const id = addSegment(mine.doc.doc, props.text.doc, { codeId, start: s.start, end: s.end });
      recent.use(codeId);
      setChosen(id);
    });
  };

  const saveJotting = (body: string) => {
    const s = sel();
    const seg = chosenSeg();
    const quote = s ? state.words().slice(s.start, s.end) : seg?.quote ?? '';
    attempt('Jotting kept.', () =>
      addMemo(props.memos.doc, {
        kind: 'jotting',
        author: props.me.id,
        title: quote ? `On “${quote.slice(0, 60)}${quote.length > 60 ? '…' : ''}”` : 'Jotting',
        body,
        attachedTo: seg && seg.coderId === mine?.coderId ? { kind: 'segment', textId: props.textId, segmentId: seg.id } : { kind: 'text', textId: props.textId },
      }),
    );
    setJotting(null);
    backToText();
  };

  const resize = (edge: 'start' | 'end', dir: 1 | -1) => {
    const seg = chosenSeg();
    if (!seg || !chosenIsMine()) return;
    const w = state.words();
    let { start, end } = seg;
    if (edge === 'start') start = dir > 0 ? Math.min(end - 1, nextWordEnd(w, start) + (w[nextWordEnd(w, start)] === ' ' ? 1 : 0)) : prevWordStart(w, start);
    else end = dir > 0 ? nextWordEnd(w, end) : Math.max(start + 1, prevWordStart(w, end) > start ? prevWordStart(w, end) - (w[prevWordStart(w, end) - 1] === ' ' ? 1 : 0) : start + 1);
    attempt('Resized.', () => resizeSegment(mine!.doc.doc, props.text.doc, seg.id, start, end));
  };

  const goTo = (segmentId: string) => {
    setChosen(segmentId);
    const s = state.segments().find((x) => x.id === segmentId);
    if (s && transcriptEl) rangeFor(transcriptEl, s.start, s.end)?.startContainer.parentElement?.scrollIntoView({ block: 'center' });
  };

  const stepSegment = (dir: 1 | -1) => {
    const list = state.segments();
    if (list.length === 0) return;
    const cur = chosenSeg();
    const at = cur ? list.indexOf(cur) : -1;
    const next = list[(at + dir + list.length) % list.length]!;
    goTo(next.id);
    setMessage(`Segment ${list.indexOf(next) + 1} of ${list.length}: ${state.codeById().get(next.codeId)?.label ?? ''}.`);
  };

  const run = (c: Command) => {
    switch (c.do) {
      case 'find-code': setPickerMode('apply'); searchInput?.focus(); break;
      case 'recent': { const id = recent.recent()[c.n - 1]; if (id) apply(id); break; }
      case 'in-vivo': inVivo(); break;
      case 'jotting': setJotting(''); queueMicrotask(() => jotInput?.focus()); break;
      case 'next-segment': stepSegment(1); break;
      case 'prev-segment': stepSegment(-1); break;
      case 'remove': if (chosenIsMine()) { attempt('Segment removed.', () => removeSegment(mine!.doc.doc, chosen()!)); setChosen(null); } break;
      case 'recode': if (chosenIsMine()) { setPickerMode('recode'); searchInput?.focus(); } break;
      case 'note': if (chosenIsMine()) noteInput?.focus(); break;
      case 'undo': undo?.undo(); break;
      case 'redo': undo?.redo(); break;
      case 'clear': setSelection(null); setChosen(null); setPickerMode('apply'); document.getSelection()?.removeAllRanges(); break;
      case 'resize': resize(c.edge, c.dir); break;
    }
  };

  const onKeyDown = (e: KeyboardEvent) => {
    const t = e.target as HTMLElement;
    if (t.closest('input, textarea, select, [contenteditable]')) return;
    const c = commandFor(e);
    if (!c) return;
    e.preventDefault();
    run(c);
  };
  onMount(() => {
    document.addEventListener('keydown', onKeyDown);
    onCleanup(() => document.removeEventListener('keydown', onKeyDown));
  });

  const layerCount = (coderId: string) => state.segments().filter((s) => s.coderId === coderId).length;
  const allCount = createMemo(() => new Map(props.layers.map((l) => [l.coderId, listSegments(l.doc.doc).length])));

  return (
    <div class="coding" data-ready={ready() && layersIn() ? 'yes' : 'no'} data-testid="coding-view">
      <div class="coding-main">
        <div class="toolbar" role="toolbar" aria-label="Coding tools">
          <button type="button" class="quiet" disabled={!canUndo()} onClick={() => run({ do: 'undo' })} aria-keyshortcuts="Control+Z">Undo</button>
          <button type="button" class="quiet" disabled={!canRedo()} onClick={() => run({ do: 'redo' })} aria-keyshortcuts="Control+Shift+Z">Redo</button>
          <button type="button" class="quiet" disabled={!sel() || !mine} onClick={inVivo} aria-keyshortcuts="i">In vivo code</button>
          <button type="button" class="quiet" disabled={!sel() && !chosenSeg()} onClick={() => run({ do: 'jotting' })} aria-keyshortcuts="j">Jotting</button>
          <Show when={isLead()}>
            <button type="button" class="quiet" disabled={!sel()} onClick={() => setCorrection(state.words().slice(sel()!.start, sel()!.end))}>Correct words…</button>
          </Show>
          <span class="muted sel-info" data-testid="selection-info">
            {sel() ? `Selected: “${state.words().slice(sel()!.start, sel()!.end).slice(0, 80)}”` : 'Nothing selected'}
          </span>
        </div>
        <p class="message" role="status" aria-live="polite" data-testid="coding-message">{message()}</p>
        <Show when={correction() !== null}>
          <form class="inline-form" aria-label="Correct the selected words" onSubmit={(e) => {
            e.preventDefault();
            const s = sel();
            // only the changed middle is rewritten, so anchors on untouched characters stay where they are
            const [i, del, ins] = s ? diff(state.words().slice(s.start, s.end), correction()!) : [0, 0, ''];
            if (s) attempt('Words corrected.', () => correctText(props.text.doc, s.start + i, del, ins));
            setCorrection(null);
            setSelection(null);
          }}>
            <label>Replace the selected words with <input data-testid="correction-input" value={correction()!} onInput={(e) => setCorrection(e.currentTarget.value)} /></label>
            <button type="submit">Replace</button>
            <button type="button" class="quiet" onClick={() => setCorrection(null)}>Cancel</button>
          </form>
        </Show>
        <Show when={jotting() !== null}>
          <form class="inline-form" aria-label="Jotting on the selection" onSubmit={(e) => { e.preventDefault(); saveJotting(jotting()!); }}>
            <label>Jotting <textarea ref={jotInput} rows="2" value={jotting()!} onInput={(e) => setJotting(e.currentTarget.value)} onKeyDown={(e) => { if (e.key === 'Enter' && (e.ctrlKey || e.metaKey)) saveJotting(jotting()!); if (e.key === 'Escape') { setJotting(null); backToText(); } }} /></label>
            <button type="submit">Keep jotting</button>
            <button type="button" class="quiet" onClick={() => { setJotting(null); backToText(); }}>Cancel</button>
          </form>
        </Show>
        <div class="lane-head" aria-hidden="true">
          <For each={visibleLayers()}>{(l) => <span class="lane-label" title={l.name}>{l.name.slice(0, 2)}</span>}</For>
        </div>
        <Transcript
          state={state}
          lanes={() => visibleLayers().map((l) => l.coderId)}
          laneName={laneName}
          selection={selection}
          setSelection={setSelection}
          selectedSegment={chosen}
          selectSegment={(id) => setChosen(id)}
          remote={presence.remote}
          onReady={() => setReady(true)}
          ref={(el) => (transcriptEl = el)}
        />
      </div>
      <aside class="coding-side" aria-label="Coding panel">
        <Show when={mine} fallback={<p class="muted">You have no layer on this text: you can read it and its visible layers.</p>}>
          <CodePicker
            codes={state.codes()}
            recent={recent.recent()}
            mode={pickerMode()}
            disabled={pickerMode() === 'apply' ? !sel() : !chosenIsMine()}
            onPick={apply}
            onDone={backToText}
            inputRef={(el) => (searchInput = el)}
          />
          <form class="inline-form" aria-label={isLead() ? 'New code' : 'Propose a code'} onSubmit={(e) => {
            e.preventDefault();
            const input = e.currentTarget.elements.namedItem('label') as HTMLInputElement;
            if (isLead()) attempt('Code added to the codebook.', () => { addCode(props.codebook.doc, { label: input.value }, { by: props.me.id }); input.value = ''; });
            else attempt('Code proposed to the lead: it shows as “(proposed)” until they decide.', () => { proposeCode(props.codebook.doc, { label: input.value, author: props.me.id }); input.value = ''; });
          }}>
            <label>{isLead() ? 'New code' : 'Propose a code'} <input name="label" /></label>
            <button type="submit" class="quiet">{isLead() ? 'Add' : 'Propose'}</button>
          </form>
        </Show>
        <Show when={chosenSeg()} keyed>
          {(s) => (
            <SegmentPanel
              segment={s}
              code={state.codeById().get(s.codeId)}
              coderName={laneName(s.coderId)}
              mine={chosenIsMine()}
              hasSelection={!!sel()}
              onRecode={() => run({ do: 'recode' })}
              onRemove={() => run({ do: 'remove' })}
              onFit={() => { const o = sel(); if (o) attempt('Segment fitted to the selection.', () => resizeSegment(mine!.doc.doc, props.text.doc, s.id, o.start, o.end)); }}
              onResize={resize}
              onNote={(n) => attempt('Note saved.', () => setSegmentNote(mine!.doc.doc, s.id, n || undefined))}
              onExample={isLead() ? (kind) => attempt(kind === 'example' ? 'Added as an example.' : 'Added as a near-miss.', () => {
                const ys = props.text.doc.getText('text');
                addExample(props.codebook.doc, s.codeId, {
                  textId: props.textId, segmentId: s.id, quote: s.quote,
                  start: Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(ys, s.start, 0)),
                  end: Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(ys, s.end, -1)),
                }, kind, { by: props.me.id });
              }) : undefined}
              stale={staleIds().has(s.id)}
              onRecheck={() => attempt('Marked re-checked against the current definition.', () => recheckSegment(mine!.doc.doc, s.id))}
              noteRef={(el) => (noteInput = el)}
            />
          )}
        </Show>
        <FlagList flags={state.flags()} codes={state.codeById()} onGo={(f) => f.segmentIds[0] && goTo(f.segmentIds[0])} />
        <section aria-labelledby="layers-h">
          <h2 id="layers-h">Layers</h2>
          <ul class="layers">
            <For each={props.layers}>
              {(l) => (
                <li>
                  <label class="check">
                    <input type="checkbox" checked={!hidden().has(l.coderId)} onChange={(e) => {
                      const next = new Set(hidden());
                      if (e.currentTarget.checked) next.delete(l.coderId); else next.add(l.coderId);
                      setHidden(next);
                    }} />
                    {l.name} <span class="muted">({hidden().has(l.coderId) ? allCount().get(l.coderId) : layerCount(l.coderId)} segments)</span>
                  </label>
                </li>
              )}
            </For>
          </ul>
        </section>
        <section aria-labelledby="people-h">
          <h2 id="people-h">In this text now</h2>
          <ul class="presence" data-testid="text-presence">
            <For each={presence.remote()} fallback={<li class="muted">Only you.</li>}>
              {(p) => <li><span class="swatch" style={{ background: p.colour }} /> {p.name}</li>}
            </For>
          </ul>
        </section>
        <details class="keys" id="coding-keys">
          <summary>Keyboard</summary>
          <dl>
            <For each={KEY_HELP}>{([k, v]) => <><dt><kbd>{k}</kbd></dt><dd>{v}</dd></>}</For>
          </dl>
        </details>
      </aside>
    </div>
  );
}
