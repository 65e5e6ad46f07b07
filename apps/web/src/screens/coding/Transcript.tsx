/**
 * The transcript with its margin. Turns render in growing batches (first screen at once, the rest on
 * later frames) and off-screen turns skip layout (`content-visibility`), so a 30,000-word text with
 * thousands of segments opens without freezing. Each turn's words are a single text node, which keeps
 * offset mapping trivial; highlights use the CSS Custom Highlight API instead of wrapping spans.
 */
import { For, Index, Show, createEffect, createMemo, createSignal, onCleanup, onMount, untrack, type Accessor } from 'solid-js';
import type { CodeView } from '@gloss/model';
import { formatTime } from '../../doc/time.js';
import { turnIndexAt, type CodeMark } from '@gloss/model';
import { CodeSwatch } from '../../ui/CodeSwatch.js';
import { layoutBars, mergeLanes, sameBars, type Bar } from './margin.js';
import { stackDepths, stripsFor, type Strip } from './underlines.js';
import { createMeasureQueue, type MeasureQueue } from './measure-queue.js';
import { move, ordered, type Move, type Sel } from './keyboard-selection.js';
import { offsetOf, rangeFor, readDomSelection } from './dom-selection.js';
import type { CodingState, ViewTurn } from './coding-state.js';
import type { RemoteCaret } from './text-presence.js';
import { describeFlag, type Flag } from '../../doc/flag-view.js';

const FIRST_BATCH = 60;
/**
 * Turns added per frame after the first screen. Small enough that one frame's rendering stays a short
 * task on a slow machine (300 turns of a 30,000-word text took a few hundred milliseconds in one task);
 * content-visibility keeps the layout of the turns off screen cheap.
 */
const BATCH = 60;
const FLAGS_SHOWN = 5;

interface TurnFlags { count: number; first: Flag[] }
const NO_FLAGS: TurnFlags = { count: 0, first: [] };

export interface TranscriptProps {
  state: CodingState;
  lanes: Accessor<string[]>;
  laneName: (coderId: string) => string;
  selection: Accessor<Sel | null>;
  setSelection: (s: Sel | null) => void;
  selectedSegment: Accessor<string | null>;
  selectSegment: (id: string | null) => void;
  remote: Accessor<RemoteCaret[]>;
  /** Jottings in the memos attached to each segment, by segment id (each shows a mark on the segment's name). */
  jottings?: Accessor<Map<string, number>>;
  /** Jottings and memos anchored to words that are not a segment, where those words are now. */
  passages?: Accessor<Passage[]>;
  chosenPassage?: Accessor<string | null>;
  choosePassage?: (memoId: string) => void;
  onReady?: () => void;
  ref?: (el: HTMLElement) => void;
}

/** Up to three letters of a person's name ("Marisol Quenby (you)" -> "MQ"), to tell layers apart beside a code. */
export function initials(name: string): string {
  return name.replace(/\(.*?\)/g, '').split(/\s+/).filter(Boolean).map((w) => w[0]!.toUpperCase()).join('').slice(0, 3);
}

export interface Passage { id: string; start: number; end: number }
const NO_PASSAGES: Passage[] = [];

const KEYS: Record<string, Move> = { ArrowRight: 'word-right', ArrowLeft: 'word-left', ArrowDown: 'turn-down', ArrowUp: 'turn-up', Home: 'turn-start', End: 'turn-end' };

export function Transcript(props: TranscriptProps) {
  let root!: HTMLDivElement;
  const [shown, setShown] = createSignal(FIRST_BATCH);
  const [tip, setTip] = createSignal<{ x: number; y: number; id: string } | null>(null);
  const total = () => props.state.turns().length;

  // Grow the rendered turns frame by frame until all are in; start again if the text grows later.
  let raf = 0;
  let marked = false;
  const grow = () => {
    raf = 0;
    if (shown() < total()) {
      setShown((n) => n + BATCH);
      raf = requestAnimationFrame(grow);
    } else {
      if (!marked && total() > 0) {
        marked = true;
        performance.mark('gloss:transcript-complete');
      }
      props.onReady?.();
    }
  };
  createEffect(() => {
    if (total() > shown() && raf === 0) raf = requestAnimationFrame(grow);
  });
  onMount(() => {
    if (total() > 0) performance.mark('gloss:transcript-first');
    if (raf === 0) raf = requestAnimationFrame(grow);
    props.ref?.(root);
  });
  onCleanup(() => cancelAnimationFrame(raf));

  // Bars are drawn only for turns near the viewport: a text with 10,000 segments has ~13,000 bars.
  const watchers = new Map<Element, (v: boolean) => void>();
  const io = typeof IntersectionObserver === 'undefined' ? undefined : new IntersectionObserver(
    (entries) => entries.forEach((e) => watchers.get(e.target)?.(e.isIntersecting)),
    { root: null, rootMargin: '800px 0px' },
  );
  onCleanup(() => io?.disconnect());
  const measure = createMeasureQueue();
  onCleanup(() => measure.dispose());
  const watch = (el: Element, set: (v: boolean) => void) => {
    if (!io) return set(true);
    watchers.set(el, set);
    io.observe(el);
    onCleanup(() => {
      io.unobserve(el);
      watchers.delete(el);
    });
  };

  // one layout per layer, redone only when that layer (or the text, or its lane) changed; joined per turn
  // in lane order. Laid out at its own lane, a layer that did not change keeps its bar objects through
  // the join, so when another layer lands the turns keep their code chips instead of building them anew.
  const NO_BARS: Bar[][] = [];
  const layerBars = [...props.state.layerSegments].map(([layer, segs]) => {
    const lane = createMemo(() => props.lanes().indexOf(layer));
    return [layer, createMemo(() => {
      if (lane() < 0) return NO_BARS;
      return layoutBars(
        props.state.turns(),
        segs().map((s) => ({ id: s.id, layer, codeId: s.codeId, start: s.start, end: s.end, orphaned: s.orphaned })),
        [layer],
        lane(),
      );
    })] as const;
  });
  const bars = createMemo(() => {
    const lanes = props.lanes();
    return mergeLanes(props.state.turns().length, lanes, new Map(layerBars.filter(([l]) => lanes.includes(l)).map(([l, b]) => [l, b()])));
  });
  // per turn: how many flags, and the first few (the only ones whose words are shown)
  const flagsByTurn = createMemo(() => {
    const m = new Map<number, TurnFlags>();
    const turns = props.state.turns();
    const flags = props.state.flags();
    let t = 0;
    for (let i = 0; i < flags.length; i++) {
      const at = flags.startAt(i);
      while (t + 1 < turns.length && turns[t + 1]!.start <= at) t++;
      const entry = m.get(t);
      if (!entry) m.set(t, { count: 1, first: [flags.at(i)] });
      else if (++entry.count <= FLAGS_SHOWN) entry.first.push(flags.at(i));
    }
    return m;
  });
  // a segment of a drawn layer by id: one map per layer, so a layer landing builds its own map only
  // (one map of every visible segment was built again, and every visible segment sorted, per layer)
  const layerById = [...props.state.layerSegments].map(([layer, segs]) => [layer, createMemo(() => new Map(segs().map((s) => [s.id, s])))] as const);
  const segmentById = (id: string) => {
    const lanes = props.lanes();
    for (const [layer, byId] of layerById) {
      const s = byId().get(id);
      if (s) return lanes.includes(layer) ? s : undefined;
    }
    return undefined;
  };
  // anchored jottings, listed under the turn where their words begin
  const passagesByTurn = createMemo(() => {
    const m = new Map<number, Passage[]>();
    const turns = props.state.turns();
    for (const p of props.passages?.() ?? []) {
      const t = Math.max(0, turnIndexAt(turns, p.start));
      m.set(t, [...(m.get(t) ?? []), p]);
    }
    return m;
  });

  const chosenStyle = document.createElement('style');
  document.head.append(chosenStyle);
  onCleanup(() => chosenStyle.remove());

  // highlights: own keyboard selection, the chosen segment, and other people's selections
  const paint = () => {
    const reg = (globalThis as { CSS?: { highlights?: Map<string, unknown> } }).CSS?.highlights;
    const H = (globalThis as { Highlight?: new (...r: Range[]) => unknown }).Highlight;
    if (!reg || !H || !root) return;
    const seg = props.selectedSegment() ? segmentById(props.selectedSegment()!) : undefined;
    const r1 = seg ? rangeFor(root, seg.start, seg.end) : null;
    reg.set('gloss-segment', new H(...(r1 ? [r1] : [])));
    // my selection stays marked when the page selection moves elsewhere (into the code search, say)
    const own = props.selection();
    const ro = own && own.anchor !== own.head ? rangeFor(root, ordered(own).start, ordered(own).end) : null;
    reg.set('gloss-own', new H(...(ro ? [ro] : [])));
    // the chosen segment is tinted in its own code's colour (a highlight's colour can only come from CSS)
    const hex = seg ? props.state.marks().marks.get(seg.codeId)?.hex : undefined;
    chosenStyle.textContent = hex ? `::highlight(gloss-segment) { background-color: ${hex}59; }` : '';
    const byColour = new Map<string, Range[]>();
    for (const c of props.remote()) {
      if (c.end <= c.start) continue;
      const r = rangeFor(root, c.start, c.end);
      if (r) byColour.set(c.colour, [...(byColour.get(c.colour) ?? []), r]);
    }
    // jottings' words: a dotted line over them (codes are under the words), the chosen one tinted too
    const notes = props.passages?.() ?? [];
    const noteRanges = (list: Passage[]) => list.map((p) => rangeFor(root, p.start, p.end)).filter((r): r is Range => r !== null);
    reg.set('gloss-jotting', new H(...noteRanges(notes)));
    reg.set('gloss-jotting-chosen', new H(...noteRanges(notes.filter((p) => p.id === props.chosenPassage?.()))));
    for (let i = 0; i < 7; i++) reg.delete(`gloss-p${i}`);
    [...byColour.values()].slice(0, 7).forEach((rs, i) => reg.set(`gloss-p${i}`, new H(...rs)));
  };
  createEffect(() => {
    props.selectedSegment();
    props.selection();
    props.remote();
    props.passages?.();
    props.chosenPassage?.();
    shown();
    props.state.words();
    queueMicrotask(paint);
  });

  // carets of other people
  const [carets, setCarets] = createSignal<Array<{ name: string; colour: string; x: number; y: number; h: number }>>([]);
  createEffect(() => {
    const list = props.remote();
    shown();
    props.state.words();
    // nobody else's caret: no layout to read (each batch of turns drawn while a long text opens would
    // otherwise force a layout of the whole transcript here)
    if (list.length === 0) {
      if (untrack(carets).length > 0) setCarets([]);
      return;
    }
    queueMicrotask(() => {
      const base = root.getBoundingClientRect();
      const out = [];
      for (const c of list) {
        const r = rangeFor(root, c.end, c.end);
        const rect = r?.getClientRects()[0] ?? r?.getBoundingClientRect();
        if (!rect || (rect.width === 0 && rect.height === 0)) continue;
        out.push({ name: c.name, colour: c.colour, x: rect.left - base.left + root.scrollLeft, y: rect.top - base.top + root.scrollTop, h: rect.height });
      }
      setCarets(out);
    });
  });

  // mirror the keyboard selection into the page selection, so it shows and can be copied
  const showSelection = (s: Sel | null) => {
    const ds = document.getSelection();
    if (!ds) return;
    ds.removeAllRanges();
    if (!s || s.anchor === s.head) return;
    const o = ordered(s);
    const r = rangeFor(root, o.start, o.end);
    if (r) {
      ds.addRange(r);
      const rect = r.getBoundingClientRect();
      const view = root.getBoundingClientRect();
      if (rect.top < view.top || rect.bottom > view.bottom) (r.startContainer.parentElement as HTMLElement | null)?.scrollIntoView({ block: 'nearest' });
    }
  };

  // selections set elsewhere (the whole-turn and sentence keys) show as the page selection too
  createEffect(() => {
    const s = props.selection();
    if (!s || s.anchor === s.head) return;
    const o = ordered(s);
    const cur = readDomSelection(root);
    if (!cur || cur.start !== o.start || cur.end !== o.end) showSelection(s);
  });
  // the keyboard cursor: its turn is marked, and a caret shows where it is while nothing is selected
  const cursorTurn = createMemo(() => {
    const s = props.selection();
    return s ? Math.max(0, turnIndexAt(props.state.turns(), s.head)) : -1;
  });
  const [ownCaret, setOwnCaret] = createSignal<{ x: number; y: number; h: number } | null>(null);
  createEffect(() => {
    const s = props.selection();
    shown();
    props.state.words();
    queueMicrotask(() => {
      if (!s || s.anchor !== s.head) return setOwnCaret(null);
      const r = rangeFor(root, s.head, s.head);
      const rect = r?.getClientRects()[0] ?? r?.getBoundingClientRect();
      if (!rect || (rect.width === 0 && rect.height === 0)) return setOwnCaret(null);
      const base = root.getBoundingClientRect();
      setOwnCaret({ x: rect.left - base.left + root.scrollLeft, y: rect.top - base.top + root.scrollTop, h: rect.height });
      (r?.startContainer.parentElement as HTMLElement | null)?.scrollIntoView({ block: 'nearest' });
    });
  });

  const onKeyDown = (e: KeyboardEvent) => {
    const how = KEYS[e.key];
    if (!how || e.altKey || e.ctrlKey || e.metaKey) return;
    e.preventDefault();
    const cur = props.selection() ?? { anchor: 0, head: 0 };
    const next = move(props.state.words(), props.state.turns(), cur, how, e.shiftKey);
    props.setSelection(next);
    showSelection(next);
  };
  const onMouseUp = () => {
    const s = readDomSelection(root);
    if (s) return props.setSelection({ anchor: s.start, head: s.end });
    // a click without a drag puts the keyboard cursor there
    const ds = document.getSelection();
    const node = ds?.anchorNode ?? null;
    const inWords = (node?.nodeType === Node.TEXT_NODE ? node.parentElement : (node as Element | null))?.closest('.words');
    if (ds && ds.rangeCount > 0 && ds.isCollapsed && inWords && root.contains(inWords)) {
      const at = offsetOf(ds.anchorNode, ds.anchorOffset);
      if (at !== null) props.setSelection({ anchor: at, head: at });
    }
  };

  const tipSegment = () => (tip() ? segmentById(tip()!.id) : undefined);

  return (
    <div
      class="transcript"
      ref={root}
      tabindex="0"
      role="document"
      aria-label="Transcript. Arrow keys select by word and turn; Shift extends."
      aria-describedby="coding-keys"
      onKeyDown={onKeyDown}
      onMouseUp={onMouseUp}
      onMouseOver={(e) => {
        const b = (e.target as HTMLElement).closest<HTMLElement>('.seg-line, .code-chip');
        setTip(b ? { x: e.clientX, y: e.clientY, id: b.dataset.id! } : null);
      }}
      onMouseLeave={() => setTip(null)}
      onClick={(e) => {
        const j = (e.target as HTMLElement).closest<HTMLElement>('[data-jot]');
        if (j) return props.choosePassage?.(j.dataset.jot!);
        const b = (e.target as HTMLElement).closest<HTMLElement>('[data-id]');
        if (b) props.selectSegment(b.dataset.id!);
      }}
      data-testid="transcript"
    >
      <Index each={props.state.turns().slice(0, shown())}>
        {(turn, i) => (
          <TurnRow
            turn={turn}
            bars={() => bars()[i] ?? []}
            flags={() => flagsByTurn().get(i) ?? NO_FLAGS}
            markOf={(codeId) => props.state.marks().marks.get(codeId)}
            labelOf={(codeId) => props.state.codeById().get(codeId)?.label ?? 'Unknown code'}
            coderTag={(layer) => (props.lanes().length > 1 ? initials(props.laneName(layer)) : '')}
            selected={props.selectedSegment}
            cursor={() => cursorTurn() === i}
            notesOf={(id) => ({ note: !!segmentById(id)?.note, jottings: props.jottings?.().get(id) ?? 0 })}
            passages={() => passagesByTurn().get(i) ?? NO_PASSAGES}
            chosenPassage={() => props.chosenPassage?.() ?? null}
            wordsOf={(p) => props.state.words().slice(p.start, p.end)}
            watch={watch}
            measure={measure}
            codes={props.state.codeById}
          />
        )}
      </Index>
      <Show when={shown() < total()}>
        <p class="progress" role="progressbar" aria-valuemin={0} aria-valuemax={total()} aria-valuenow={shown()}>
          Showing {shown()} of {total()} turns…
        </p>
      </Show>
      <Show when={ownCaret()}>
        {(c) => <span class="own-caret" style={{ left: `${c().x}px`, top: `${c().y}px`, height: `${c().h}px` }} aria-hidden="true" data-testid="own-caret" />}
      </Show>
      <For each={carets()}>
        {(c) => (
          <span class="caret" style={{ left: `${c.x}px`, top: `${c.y}px`, height: `${c.h}px`, background: c.colour }} aria-hidden="true">
            <span class="caret-name" style={{ background: c.colour }}>{c.name}</span>
          </span>
        )}
      </For>
      <Show when={tipSegment()}>
        {(s) => {
          const code = () => props.state.codeById().get(s().codeId);
          return (
            <div class="tip" role="tooltip" style={{ left: `${tip()!.x + 12}px`, top: `${tip()!.y + 12}px` }}>
              <strong>{code()?.label ?? 'Unknown code'}</strong>
              <Show when={code()?.briefDefinition}><p>{code()!.briefDefinition}</p></Show>
              <p class="muted">Coder: {props.laneName(s().coderId)}</p>
              <Show when={s().note}><p>Note: {s().note}</p></Show>
            </div>
          );
        }}
      </Show>
    </div>
  );
}

type TurnStrip = Strip & { id: string; codeId: string };

function TurnRow(props: {
  turn: Accessor<ViewTurn>;
  bars: Accessor<Bar[]>;
  flags: Accessor<TurnFlags>;
  markOf: (codeId: string) => CodeMark | undefined;
  labelOf: (codeId: string) => string;
  /** Who coded it, shown beside the code when more than one layer is drawn ('' when only one). */
  coderTag: (layer: string) => string;
  selected: Accessor<string | null>;
  /** The keyboard cursor is in this turn. */
  cursor: Accessor<boolean>;
  notesOf: (segmentId: string) => { note: boolean; jottings: number };
  passages: Accessor<Passage[]>;
  chosenPassage: Accessor<string | null>;
  wordsOf: (p: Passage) => string;
  watch: (el: Element, set: (v: boolean) => void) => void;
  measure: MeasureQueue;
  codes: Accessor<Map<string, CodeView>>;
}) {
  const [near, setNear] = createSignal(false);
  // Underlines: once a turn is near the viewport, measure the line boxes of its segments' words.
  let rowEl!: HTMLDivElement;
  let wordsEl!: HTMLParagraphElement;
  const [strips, setStrips] = createSignal<TurnStrip[]>([]);
  // Strips measured last time, by bar (segment, code, words, depth): when a layer lands, only its own
  // bars are measured, and the others keep their objects (and so their lines' DOM).
  let kept = new Map<string, TurnStrip[]>();
  let measuredWords = '';
  let measuredWidth = -1;
  createEffect(() => {
    const list = near() ? bars() : [];
    props.turn().words;
    if (list.length === 0) {
      setStrips([]);
      return props.measure.cancel(rowEl);
    }
    const depths = stackDepths(list.map((b) => ({ id: b.id, from: b.from, to: b.to })));
    // reads here, the write returned: the queue runs all turns' reads before any write
    props.measure.schedule(rowEl, () => {
      const node = wordsEl.firstChild;
      if (!node) return;
      const base = wordsEl.getBoundingClientRect();
      const text = node.textContent ?? '';
      // what was measured holds while the words and the width of their box stay the same
      if (text !== measuredWords || base.width !== measuredWidth) {
        measuredWords = text;
        measuredWidth = base.width;
        kept.clear();
      }
      const len = text.length;
      const out: TurnStrip[] = [];
      const seen = new Map<string, TurnStrip[]>();
      let r: Range | undefined;
      for (const b of list) {
        if (b.orphaned || b.to <= b.from) continue;
        const key = `${b.id}\u0000${b.codeId}\u0000${b.from}\u0000${b.to}\u0000${depths.get(b.id) ?? 0}`;
        let strips = seen.get(key) ?? kept.get(key);
        if (!strips) {
          r ??= document.createRange();
          r.setStart(node, Math.min(b.from, len));
          r.setEnd(node, Math.min(b.to, len));
          strips = stripsFor([...r.getClientRects()], base, depths.get(b.id) ?? 0).map((st) => ({ ...st, id: b.id, codeId: b.codeId }));
        }
        seen.set(key, strips);
        for (const st of strips) out.push(st);
      }
      kept = seen;
      return () => setStrips(out);
    });
  });
  onCleanup(() => props.measure.cancel(rowEl));
  // keep the DOM of unchanged turns: only a different layout replaces the lines and the code list
  const bars = createMemo(props.bars, [], { equals: sameBars });
  // one entry per segment touching this turn, in text order
  const applied = createMemo(() => {
    const seen = new Set<string>();
    return bars().filter((b) => (seen.has(b.id) ? false : (seen.add(b.id), true))).sort((a, b) => a.from - b.from || a.to - b.to);
  });
  const words = () => props.turn().words;
  return (
    <div class="turn" classList={{ 'cursor-turn': props.cursor() }} ref={(el) => { rowEl = el; props.watch(el, setNear); }}>
      <div class="margin" aria-hidden="true">
        <Show when={props.flags().count > 0}>
          <span class="flag-mark" data-id={props.flags().first[0]!.segmentIds[0]} title={near() ? props.flags().first.map((f) => describeFlag(f, props.codes())).join('\n') : undefined}>
            {props.flags().count > 1 ? props.flags().count : '!'}
          </span>
        </Show>
      </div>
      <div class="turn-body">
        <div class="turn-head">
          <Show when={props.turn().speaker}><span class="speaker">{props.turn().speaker}</span></Show>
          <Show when={props.turn().startMs != null}><span class="time">{formatTime(props.turn().startMs!)}</span></Show>
        </div>
        <div class="words-box">
          <p class="words" ref={wordsEl} data-start={props.turn().start}>{words()}</p>
          <For each={strips()}>
            {(st) => {
              const m = () => props.markOf(st.codeId);
              return (
                <div
                  class="seg-line"
                  classList={{ chosen: props.selected() === st.id }}
                  data-id={st.id}
                  aria-hidden="true"
                  style={{
                    left: `${st.left}px`,
                    top: `${st.top}px`,
                    width: `${st.width}px`,
                    'border-bottom': `${m()?.mark === 'double' ? 4 : 3}px ${m()?.mark ?? 'solid'} ${m()?.hex ?? '#888888'}`,
                  }}
                />
              );
            }}
          </For>
        </div>
        <Show when={near() && (applied().length > 0 || props.passages().length > 0)}>
          <ul class="turn-codes" aria-label="Codes applied in this turn" data-testid="turn-codes">
            <For each={applied()}>
              {(b) => (
                <li>
                  <button
                    type="button"
                    class="code-chip"
                    classList={{ chosen: props.selected() === b.id, orphaned: b.orphaned }}
                    data-id={b.id}
                    aria-pressed={props.selected() === b.id}
                  >
                    <CodeSwatch mark={props.markOf(b.codeId)} />
                    <span class="code-chip-label">{props.labelOf(b.codeId)}</span>
                    <Show when={props.coderTag(b.layer)}><span class="code-chip-coder">{props.coderTag(b.layer)}</span></Show>
                    <Show when={props.notesOf(b.id).note}><span class="note-mark" title="This segment has a note" data-testid="note-mark">✎<span class="sr-only"> has a note</span></span></Show>
                    <Show when={props.notesOf(b.id).jottings > 0}><span class="note-mark" title="Jottings on this segment in the memos" data-testid="jotting-mark">✉{props.notesOf(b.id).jottings}<span class="sr-only"> jottings</span></span></Show>
                  </button>
                </li>
              )}
            </For>
            <For each={props.passages()}>
              {(p) => (
                <li>
                  <button type="button" class="jot-chip" classList={{ chosen: props.chosenPassage() === p.id }} data-jot={p.id} aria-pressed={props.chosenPassage() === p.id} data-testid="jotting-chip"
                    title={`Jotting on “${props.wordsOf(p)}”`}>
                    <span aria-hidden="true">✉</span> jotting<span class="sr-only"> on “{props.wordsOf(p)}”</span>
                  </button>
                </li>
              )}
            </For>
          </ul>
        </Show>
      </div>
    </div>
  );
}
