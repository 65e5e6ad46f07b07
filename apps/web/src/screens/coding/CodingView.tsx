/** The coding view proper, once every document is open. */
import { For, Show, createMemo, createResource, createSignal, onCleanup, onMount } from 'solid-js';
import { countOf } from '../../ui/count-words.js';
import * as Y from 'yjs';
import {
  addCode, addExample, addInVivoCode, addMemo, addSegment, correctText, createUndoManager, getSegmentsMap,
  recheckSegment, recodeSegment, removeSegment, resizeSegment, setSegmentNote, listSegments, reconcileLayer, withOrigin, proposeCode,
  getText, listMemos, MEMOS_ROOT, PROPOSALS_ROOT, turnIndexAt, passageAttachment, resolvePassage, getMemo,
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
import { nextWordEnd, ordered, prevWordStart, sentenceSelection, turnSelection, type Sel } from './keyboard-selection.js';
import { rangeFor } from './dom-selection.js';
import { errorMessage } from '../../api/errors.js';
import { decide, refusedMessage, savedMessage, undoMessage, type CodingAction } from './coding-actions.js';
import { WhoseCoding } from './WhoseCoding.js';
import { useSeenCodes } from '../../ui/seen-codes.js';
import { diff } from '../../ui/ytext-binding.js';
import { api } from '../../api/client.js';
import { NotesHere } from './NotesHere.js';
import { marksOverflowWords } from '../../doc/code-marks.js';

export interface CodingViewProps {
  studyId: string;
  textId: string;
  text: OpenDoc;
  layers: LayerHandle[];
  codebook: OpenDoc;
  memos: OpenDoc;
  scope: StudyScope;
  me: Me;
  /** Open with this segment chosen and in view ("go to the passage" from a memo or jotting). */
  goToSegment?: string | undefined;
  /** Open with this memo's or jotting's passage chosen and in view. */
  goToMemo?: string | undefined;
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
  // each undo step remembers what it did, in words, so undo and redo can say what they undid
  let doing: string | undefined;
  let popping: string | undefined;
  undo?.on('stack-item-added', (e: { stackItem: { meta: Map<string, unknown> } }) => {
    e.stackItem.meta.set('what', undo!.undoing || undo!.redoing ? popping : doing);
    refreshUndo();
  });
  undo?.on('stack-item-popped', refreshUndo);
  const can = (a: CodingAction) => decide(role(), a, { permissions: props.scope.study()?.permissions, hasLayer: !!mine });
  const allowed = (a: CodingAction) => can(a).allowed;

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

  // jottings attached to segments of this text, counted per segment (a mark on the segment's name)
  const [memosV, setMemosV] = createSignal(0);
  const memosRoot = props.memos.doc.getMap(MEMOS_ROOT);
  const onMemos = () => setMemosV((n) => n + 1);
  memosRoot.observeDeep(onMemos);
  onCleanup(() => memosRoot.unobserveDeep(onMemos));
  const jottingsBySegment = createMemo(() => {
    memosV();
    const m = new Map<string, number>();
    for (const memo of listMemos(props.memos.doc, { textId: props.textId, attachedKind: 'segment' })) {
      const id = (memo.attachedTo as { segmentId?: string }).segmentId;
      if (id) m.set(id, (m.get(id) ?? 0) + 1);
    }
    return m;
  });
  // jottings and memos anchored to words that are not a segment, where those words are now
  const passages = createMemo(() => {
    memosV();
    state.words();
    const out: Array<{ id: string; start: number; end: number }> = [];
    for (const memo of listMemos(props.memos.doc, { textId: props.textId, attachedKind: 'text' })) {
      const r = resolvePassage(props.text.doc, props.textId, memo.attachedTo);
      if (r) out.push({ id: memo.id, ...r });
    }
    return out;
  });
  const [chosenNote, setChosenNote] = createSignal<string | null>(null);
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const nameOf = (id: string) => (id === props.me.id ? 'you' : members()?.find((m) => m.userId === id)?.name ?? props.layers.find((l) => l.coderId === id)?.name ?? 'someone');
  const recent = useRecentCodes(props.studyId);
  const seen = useSeenCodes(props.studyId, props.me.id);
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
  const [keysOpen, setKeysOpen] = createSignal(false);
  const [layersIn, setLayersIn] = createSignal(false);
  // every layer and the codebook have arrived: mark the frame after they are drawn (the benchmark reads it)
  void Promise.all([props.codebook.whenReady, ...props.layers.map((l) => l.doc.whenReady)]).then(() => {
    setLayersIn(true);
    if (props.goToSegment) requestAnimationFrame(() => goTo(props.goToSegment!));
    if (props.goToMemo) void props.memos.whenReady.then(() => requestAnimationFrame(() => goToNote(props.goToMemo!)));
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
  // where the keyboard cursor is, in words, while no words are selected (the person is never lost)
  const cursorWords = () => {
    const s = selection();
    if (!s) return 'Nothing selected: press ↓ or click the text to start';
    const turns = state.turns();
    const i = Math.max(0, turnIndexAt(turns, s.head));
    const t = turns[i];
    return `Cursor in turn ${i + 1} of ${turns.length}${t?.speaker ? ` (${t.speaker})` : ''}; no words selected`;
  };
  const laneName = (coderId: string) => props.layers.find((l) => l.coderId === coderId)?.name ?? coderId;

  /**
   * Does one change the role table allows, then tells what the server made of it: saved, kept on this
   * device while offline, or refused (then the change is taken back here, so nothing stays that the
   * server will not keep). Each target is a document and the root types the change may touch.
   */
  const act = async (action: CodingAction, done: string, targets: Array<{ doc: OpenDoc; types: Array<Y.AbstractType<any>> }>, f: (proposal: boolean) => void): Promise<boolean> => {
    const d = can(action);
    if (!d.allowed) {
      setMessage(d.message);
      return false;
    }
    const takeBack = targets.map((t) => ({ doc: t.doc, um: new Y.UndoManager(t.types, { trackedOrigins: new Set([null]), captureTimeout: 0 }) }));
    doing = done.replace(/\.$/, '').replace(/^./, (c) => c.toLowerCase()) + '.';
    try {
      f(d.proposal);
    } catch (err) {
      takeBack.forEach((t) => t.um.destroy());
      setMessage(`Not done: ${errorMessage(err)}`);
      return false;
    } finally {
      doing = undefined;
    }
    takeBack.forEach((t) => t.um.trackedOrigins.delete(null));
    setMessage(`${done} Sending…`);
    const answers = await Promise.all(takeBack.map((t) => t.doc.confirm()));
    const refusal = answers.find((a) => a.outcome === 'refused');
    if (refusal && refusal.outcome === 'refused') {
      takeBack.forEach((t) => t.um.undo());
      setMessage(refusedMessage(refusal.reason));
    } else setMessage(savedMessage(done, answers.some((a) => a.outcome === 'offline') ? 'offline' : 'saved'));
    takeBack.forEach((t) => t.um.destroy());
    return !refusal;
  };
  const layerTarget = () => [{ doc: mine!.doc, types: [getSegmentsMap(mine!.doc.doc) as unknown as Y.AbstractType<any>] }];
  const codebookTarget = () => ({ doc: props.codebook, types: [props.codebook.doc.getMap('codes'), props.codebook.doc.getMap(PROPOSALS_ROOT)] as Array<Y.AbstractType<any>> });
  const memosTarget = () => [{ doc: props.memos, types: [props.memos.doc.getMap(MEMOS_ROOT)] as Array<Y.AbstractType<any>> }];
  const undoStep = (kind: 'undo' | 'redo') => {
    const d = can(kind);
    if (!d.allowed) return setMessage(d.message);
    const stack = kind === 'undo' ? undo?.undoStack : undo?.redoStack;
    const top = stack?.[stack.length - 1];
    popping = top?.meta.get('what') as string | undefined;
    if (!top) return setMessage(undoMessage(kind, undefined));
    if (kind === 'undo') undo!.undo(); else undo!.redo();
    popping = undefined;
    const said = undoMessage(kind, top.meta.get('what') as string | undefined ?? 'your last change.');
    setMessage(`${said} Sending…`);
    void mine!.doc.confirm().then((c) => setMessage(c.outcome === 'refused' ? refusedMessage(c.reason) : savedMessage(said, c.outcome)));
  };
  const backToText = () => transcriptEl?.focus();

  const apply = (codeId: string) => {
    const label = `“${state.codeById().get(codeId)?.label ?? ''}”`;
    if (pickerMode() === 'recode' && chosenIsMine()) {
      const id = chosen()!;
      void act('recode', `Recoded as ${label}.`, layerTarget(), () => recodeSegment(mine!.doc.doc, id, codeId));
      recent.use(codeId);
      setPickerMode('apply');
      backToText();
      return;
    }
    const s = sel();
    const d = can('code');
    if (!d.allowed) return setMessage(d.message);
    if (!s) return setMessage('Select some words first.');
    void act('code', `Coded ${label}.`, layerTarget(), () => {
      const id = addSegment(mine!.doc.doc, props.text.doc, { codeId, start: s.start, end: s.end });
      chooseSegment(id);
    });
    recent.use(codeId);
    backToText();
  };

  const inVivo = () => {
    const d = can('in-vivo');
    if (!d.allowed) return setMessage(d.message);
    const s = sel();
    if (!s) return setMessage('Select the words to use as the code first.');
    const words = state.words().slice(s.start, s.end);
    // Only the lead and owner write codes; anyone else's in vivo code goes to them as a proposal.
    void act('in-vivo', d.proposal ? `In vivo code “${words}” proposed to the lead and applied; it shows as “(proposed)” until they decide.` : `In vivo code “${words}” added and applied.`, [codebookTarget(), ...layerTarget()], (proposal) => {
      const codeId = proposal
        ? proposeCode(props.codebook.doc, { label: words, inVivo: true, author: props.me.id, textId: props.textId, quote: words })
        : addInVivoCode(props.codebook.doc, words, { by: props.me.id });
      const id = addSegment(mine!.doc.doc, props.text.doc, { codeId, start: s.start, end: s.end });
      recent.use(codeId);
      chooseSegment(id);
    });
  };

  const saveJotting = (body: string) => {
    const s = sel();
    const seg = chosenSeg();
    const quote = s ? state.words().slice(s.start, s.end) : seg?.quote ?? '';
    // on my chosen segment when no other words are selected (or exactly its words); otherwise on the
    // selected words themselves, anchored like a segment, so the jotting is marked where it was made
    const onSegment = seg && seg.coderId === mine?.coderId && (!s || (s.start === seg.start && s.end === seg.end));
    const words = s ?? (seg && !seg.orphaned ? { start: seg.start, end: seg.end } : null);
    let made: string | undefined;
    void act('jot', 'Jotting added to the memos.', memosTarget(), () => {
      made = addMemo(props.memos.doc, {
        kind: 'jotting',
        author: props.me.id,
        title: quote ? `On “${quote.slice(0, 60)}${quote.length > 60 ? '…' : ''}”` : 'Jotting',
        body,
        attachedTo: onSegment ? { kind: 'segment', textId: props.textId, segmentId: seg.id } : words ? passageAttachment(props.text.doc, props.textId, words.start, words.end) : { kind: 'text', textId: props.textId },
      });
    }).then((kept) => {
      // the new jotting shows beside its words, with its replies, once the server kept it
      if (kept && made && !onSegment) chooseNote(made);
    });
    setJotting(null);
    backToText();
  };

  const chooseSegment = (id: string | null) => {
    setChosen(id);
    setChosenNote(null);
  };
  let sideEl: HTMLElement | undefined;
  const chooseNote = (id: string | null) => {
    setChosenNote(id);
    setChosen(null);
    // the notes sit below the code list: bring them into the side panel's view
    if (id) requestAnimationFrame(() => sideEl?.querySelector('[data-testid="notes-here"]')?.scrollIntoView({ block: 'nearest' }));
  };
  /** Go to the passage of a memo or jotting: its segment, or the words it is anchored to. */
  const goToNote = (memoId: string) => {
    let a;
    try {
      a = getMemo(props.memos.doc, memoId).attachedTo;
    } catch {
      return setMessage('That memo or jotting is no longer in the memos.');
    }
    if (a.kind === 'segment') return goTo(a.segmentId);
    const r = resolvePassage(props.text.doc, props.textId, a);
    if (!r) return setMessage('The words that jotting was on are no longer in the text.');
    chooseNote(memoId);
    if (transcriptEl) rangeFor(transcriptEl, r.start, r.end)?.startContainer.parentElement?.scrollIntoView({ block: 'center' });
  };
  // what the notes panel shows: the chosen anchored jotting, or the jottings and memos on the chosen segment
  const notesHere = createMemo(() => {
    memosV();
    const n = chosenNote();
    if (n) return listMemos(props.memos.doc, { textId: props.textId }).filter((m) => m.id === n);
    const seg = chosenSeg();
    return seg ? listMemos(props.memos.doc, { textId: props.textId, segmentId: seg.id }) : [];
  });

  const resize = (edge: 'start' | 'end', dir: 1 | -1) => {
    const seg = chosenSeg();
    if (!seg || !chosenIsMine()) return;
    const w = state.words();
    let { start, end } = seg;
    if (edge === 'start') start = dir > 0 ? Math.min(end - 1, nextWordEnd(w, start) + (w[nextWordEnd(w, start)] === ' ' ? 1 : 0)) : prevWordStart(w, start);
    else end = dir > 0 ? nextWordEnd(w, end) : Math.max(start + 1, prevWordStart(w, end) > start ? prevWordStart(w, end) - (w[prevWordStart(w, end) - 1] === ' ' ? 1 : 0) : start + 1);
    void act('resize', `Resized “${state.codeById().get(seg.codeId)?.label ?? ''}”.`, layerTarget(), () => resizeSegment(mine!.doc.doc, props.text.doc, seg.id, start, end));
  };

  const goTo = (segmentId: string) => {
    chooseSegment(segmentId);
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
      case 'find-code': { const d = can('code'); if (!d.allowed) { setMessage(d.message); break; } setPickerMode('apply'); searchInput?.focus(); break; }
      case 'recent': { const d = can('code'); if (!d.allowed) { setMessage(d.message); break; } const id = recent.recent()[c.n - 1]; if (id) apply(id); break; }
      case 'in-vivo': inVivo(); break;
      case 'jotting': { const d = can('jot'); if (!d.allowed) { setMessage(d.message); break; } setJotting(''); queueMicrotask(() => jotInput?.focus()); break; }
      case 'next-segment': stepSegment(1); break;
      case 'prev-segment': stepSegment(-1); break;
      case 'remove': {
        const seg = chosenSeg();
        if (!seg) { setMessage('Choose a segment first ([ and ] step through them).'); break; }
        if (!chosenIsMine()) { setMessage(can('remove').allowed ? 'Not saved: you can only remove your own segments.' : (can('remove') as { message: string }).message); break; }
        void act('remove', `Removed the segment coded “${state.codeById().get(seg.codeId)?.label ?? ''}”.`, layerTarget(), () => removeSegment(mine!.doc.doc, seg.id));
        chooseSegment(null);
        break;
      }
      case 'recode': { const d = can('recode'); if (!d.allowed) { setMessage(d.message); break; } if (chosenIsMine()) { setPickerMode('recode'); searchInput?.focus(); } break; }
      case 'note': { const d = can('note'); if (!d.allowed) { setMessage(d.message); break; } if (chosenIsMine()) noteInput?.focus(); break; }
      case 'undo': undoStep('undo'); break;
      case 'redo': undoStep('redo'); break;
      case 'clear': setSelection(null); chooseSegment(null); setChosenNote(null); setPickerMode('apply'); document.getSelection()?.removeAllRanges(); break;
      case 'resize': { const d = can('resize'); if (!d.allowed) { setMessage(d.message); break; } resize(c.edge, c.dir); break; }
      case 'keys': setKeysOpen((o) => !o); break;
      case 'select-turn': case 'select-sentence': {
        const at = selection()?.head ?? 0;
        const next = c.do === 'select-turn' ? turnSelection(state.turns(), at) : sentenceSelection(state.words(), state.turns(), at);
        if (next) setSelection(next);
        backToText();
        break;
      }
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

  // each layer's own resolved list (filtering every visible layer's segments for each count redid it all per layer)
  // from each layer's own list: the sorted list of all visible segments is then built only when asked for
  // (by stepping through segments), not again each time a layer lands while a text opens
  const noSegments = createMemo(() => visibleLayers().every((l) => (state.layerSegments.get(l.coderId)?.().length ?? 0) === 0));
  const layerCount = (coderId: string) => state.layerSegments.get(coderId)?.().length ?? 0;
  const allCount = createMemo(() => new Map(props.layers.map((l) => [l.coderId, listSegments(l.doc.doc).length])));
  const codingAllowed = () => allowed('code');

  return (
    <div class="coding" data-ready={ready() && layersIn() ? 'yes' : 'no'} data-testid="coding-view">
      <div class="coding-main">
        <div class="toolbar" role="toolbar" aria-label="Coding tools">
          <Show when={allowed('undo')}>
            <button type="button" class="quiet" disabled={!canUndo()} onClick={() => run({ do: 'undo' })} aria-keyshortcuts="Control+Z">Undo</button>
            <button type="button" class="quiet" disabled={!canRedo()} onClick={() => run({ do: 'redo' })} aria-keyshortcuts="Control+Shift+Z">Redo</button>
          </Show>
          <Show when={allowed('in-vivo') && mine}>
            <button type="button" class="quiet" disabled={!sel()} onClick={inVivo} aria-keyshortcuts="i">In vivo code</button>
          </Show>
          <Show when={allowed('jot')}>
            <button type="button" class="quiet" disabled={!sel() && !chosenSeg()} onClick={() => run({ do: 'jotting' })} aria-keyshortcuts="j"
              title="A jotting is a short memo in the study's memos, tied to these words: the whole team reads it there.">Jotting</button>
          </Show>
          <Show when={allowed('correct')}>
            <button type="button" class="quiet" disabled={!sel()} onClick={() => setCorrection(state.words().slice(sel()!.start, sel()!.end))}>Correct words…</button>
          </Show>
          <button type="button" class="quiet" onClick={() => run({ do: 'select-turn' })} aria-keyshortcuts="t">Whole turn</button>
          <button type="button" class="quiet" onClick={() => run({ do: 'select-sentence' })} aria-keyshortcuts="s">Sentence</button>
          <button type="button" class="quiet" disabled={noSegments()} onClick={() => run({ do: 'prev-segment' })} aria-keyshortcuts="[" aria-label="Previous segment">◂ Segment</button>
          <button type="button" class="quiet" disabled={noSegments()} onClick={() => run({ do: 'next-segment' })} aria-keyshortcuts="]" aria-label="Next segment">Segment ▸</button>
          <button type="button" class="quiet" disabled={!selection() && !chosen() && !chosenNote()} onClick={() => run({ do: 'clear' })} aria-keyshortcuts="Escape">Clear</button>
          <button type="button" class="quiet" aria-expanded={keysOpen()} aria-controls="coding-keys" onClick={() => run({ do: 'keys' })} aria-keyshortcuts="?">Keys</button>
          <span class="muted sel-info" data-testid="selection-info">
            {sel() ? `Selected: “${state.words().slice(sel()!.start, sel()!.end).slice(0, 80)}”` : cursorWords()}
          </span>
        </div>
        <section id="coding-keys" class="keys-panel" aria-label="Keys of the coding view" hidden={!keysOpen()}>
          <dl>
            <For each={KEY_HELP}>{(k) => <><dt><kbd>{k.keys}</kbd></dt><dd>{k.does}</dd><dd class="muted">or: {k.control}</dd></>}</For>
          </dl>
        </section>
        <p class="message" role="status" aria-live="polite" data-testid="coding-message">{message()}</p>
        <Show when={correction() !== null}>
          <form class="inline-form" aria-label="Correct the selected words" onSubmit={(e) => {
            e.preventDefault();
            const s = sel();
            // only the changed middle is rewritten, so anchors on untouched characters stay where they are
            const [i, del, ins] = s ? diff(state.words().slice(s.start, s.end), correction()!) : [0, 0, ''];
            if (s) void act('correct', 'Words corrected.', [{ doc: props.text, types: [getText(props.text.doc)] }], () => correctText(props.text.doc, s.start + i, del, ins));
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
        <Transcript
          state={state}
          lanes={() => visibleLayers().map((l) => l.coderId)}
          laneName={laneName}
          selection={selection}
          setSelection={setSelection}
          selectedSegment={chosen}
          selectSegment={chooseSegment}
          remote={presence.remote}
          jottings={jottingsBySegment}
          passages={passages}
          chosenPassage={chosenNote}
          choosePassage={chooseNote}
          onReady={() => setReady(true)}
          ref={(el) => (transcriptEl = el)}
        />
      </div>
      <aside class="coding-side" aria-label="Coding panel" ref={sideEl}>
        <Show when={mine && codingAllowed()} fallback={<p class="muted" data-testid="read-only-note">{mine ? 'You may read this text and the coding shown; your role does not code.' : 'You have no layer on this text: you can read it and the coding shown.'}</p>}>
          <CodePicker
            codes={state.codes()}
            themes={state.themes()}
            unseenEdit={(id) => { const e = state.lastEdits().get(id); return e && e.by !== props.me.id && e.at > seen.seenAt(id) ? e : undefined; }}
            onSeen={(id) => seen.markSeen(id)}
            marks={state.marks().marks}
            recent={recent.recent()}
            mode={pickerMode()}
            disabled={pickerMode() === 'apply' ? !sel() : !chosenIsMine()}
            onPick={apply}
            onDone={backToText}
            inputRef={(el) => (searchInput = el)}
          />
          <Show when={allowed('new-code')}>
          <form class="inline-form" aria-label={isLead() ? 'New code' : 'Propose a code'} onSubmit={(e) => {
            e.preventDefault();
            const input = e.currentTarget.elements.namedItem('label') as HTMLInputElement;
            const label = input.value;
            const proposal = can('new-code').allowed && (can('new-code') as { proposal: boolean }).proposal;
            void act('new-code', proposal ? `Code “${label}” proposed to the lead: it shows as “(proposed)” until they decide.` : `Code “${label}” added to the codebook.`, [codebookTarget()], (p) => {
              if (p) proposeCode(props.codebook.doc, { label, author: props.me.id });
              else addCode(props.codebook.doc, { label }, { by: props.me.id });
              input.value = '';
            });
          }}>
            <label>{isLead() ? 'New code' : 'Propose a code'} <input name="label" /></label>
            <button type="submit" class="quiet">{isLead() ? 'Add' : 'Propose'}</button>
          </form>
          </Show>
        </Show>
        <Show when={chosenSeg()} keyed>
          {(s) => (
            <SegmentPanel
              segment={s}
              code={state.codeById().get(s.codeId)}
              mark={state.marks().marks.get(s.codeId)}
              coderName={laneName(s.coderId)}
              mine={chosenIsMine()}
              hasSelection={!!sel()}
              onRecode={() => run({ do: 'recode' })}
              onRemove={() => run({ do: 'remove' })}
              onFit={() => { const o = sel(); if (o) void act('resize', 'Segment fitted to the selection.', layerTarget(), () => resizeSegment(mine!.doc.doc, props.text.doc, s.id, o.start, o.end)); }}
              onResize={resize}
              onNote={(n) => void act('note', n ? `Note on “${state.codeById().get(s.codeId)?.label ?? ''}” changed.` : `Note on “${state.codeById().get(s.codeId)?.label ?? ''}” removed.`, layerTarget(), () => setSegmentNote(mine!.doc.doc, s.id, n || undefined))}
              onExample={allowed('example') ? (kind) => void act('example', kind === 'example' ? 'Added as an example.' : 'Added as a near-miss.', [codebookTarget()], () => {
                const ys = props.text.doc.getText('text');
                addExample(props.codebook.doc, s.codeId, {
                  textId: props.textId, segmentId: s.id, quote: s.quote,
                  start: Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(ys, s.start, 0)),
                  end: Y.encodeRelativePosition(Y.createRelativePositionFromTypeIndex(ys, s.end, -1)),
                }, kind, { by: props.me.id });
              }) : undefined}
              stale={staleIds().has(s.id)}
              onRecheck={() => void act('recheck', 'Marked re-checked against the current definition.', layerTarget(), () => recheckSegment(mine!.doc.doc, s.id))}
              noteRef={(el) => (noteInput = el)}
            />
          )}
        </Show>
        <Show when={notesHere().length > 0}>
          <NotesHere on={chosenNote() ? 'these words' : 'this segment'} notes={notesHere()} mm={props.memos} me={props.me} nameOf={nameOf} version={memosV} mayReply={allowed('reply')} />
        </Show>
        <FlagList flags={state.flags()} checking={state.flagsChecking()} codes={state.codeById()} onGo={(f) => f.segmentIds[0] && goTo(f.segmentIds[0])} />
        <section aria-labelledby="layers-h">
          <h2 id="layers-h">Whose coding is shown</h2>
          <WhoseCoding layers={props.layers} hidden={hidden()} setHidden={setHidden} />
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
                    {l.name} <span class="muted">({countOf(hidden().has(l.coderId) ? allCount().get(l.coderId) ?? 0 : layerCount(l.coderId), 'segment')})</span>
                  </label>
                </li>
              )}
            </For>
          </ul>
          <Show when={state.marks().overflow}>
            <p class="warn" data-testid="marks-overflow">
              {marksOverflowWords(state.codes().length, state.marks().pairs)} The names are under each turn.
            </p>
          </Show>
        </section>
        <section aria-labelledby="people-h">
          <h2 id="people-h">In this text now</h2>
          <ul class="presence" data-testid="text-presence">
            <For each={presence.remote()} fallback={<li class="muted">Only you.</li>}>
              {(p) => <li><span class="swatch" style={{ background: p.colour }} /> {p.name}</li>}
            </For>
          </ul>
        </section>
      </aside>
    </div>
  );
}
