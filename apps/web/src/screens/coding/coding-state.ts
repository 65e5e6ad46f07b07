/**
 * The reactive state of one open text: its turns and words, every visible layer's resolved segments,
 * the codebook's codes and exclusive sets, and the flags they give. Yjs changes bump a version signal;
 * derived values are recomputed once per batch of changes, in bulk (one resolution pass per layer).
 */
import { createComputed, createMemo, createSignal, onCleanup, untrack, type Accessor } from 'solid-js';
import * as Y from 'yjs';
import {
  assignMarks, getText, listExclusiveSets, listThemes, lastDefinitionEdits, listSegments, readTurns, resolveSegments,
  type ChangeEntry, type CodeGroup, type CodeView, type MarkAssignment, type ResolvedTurn,
} from '@gloss/model';
import { codesInView } from '../../doc/code-marks.js';
import { PRIMED, nextInOwnTask, type OpenDoc } from '../../sync/open-doc.js';
import { useFlags } from './flags-source.js';
import type { Segment } from '../../doc/flag-view.js';
import type { FlagSet } from '../../doc/flag-pack.js';

export interface LayerHandle { coderId: string; name: string; mine: boolean; doc: OpenDoc; kind?: 'coder' | 'consensus' | undefined; canWrite?: boolean | undefined }

/** A turn as shown: its words without the separating newline, `end` just past the last word. */
export type ViewTurn = ResolvedTurn & { words: string };

export interface CodingState {
  turns: Accessor<ViewTurn[]>;
  words: Accessor<string>;
  segments: Accessor<Segment[]>;
  /** Each opened layer's resolved segments, by coder id (visible or not), so views can work per layer. */
  layerSegments: ReadonlyMap<string, Accessor<Segment[]>>;
  codes: Accessor<CodeView[]>;
  codeById: Accessor<Map<string, CodeView>>;
  /** Each code's colour and mark (codebook order, so the same for everyone): see model `assignMarks`. */
  marks: Accessor<MarkAssignment>;
  exclusiveSets: Accessor<CodeGroup[]>;
  themes: Accessor<CodeGroup[]>;
  /** Each code's newest recorded definition edit. */
  lastEdits: Accessor<Map<string, ChangeEntry>>;
  flags: Accessor<FlagSet>;
  /** Flags are still being worked out for the layers the text opened with. */
  flagsChecking: Accessor<boolean>;
}

/**
 * A signal bumped (once per batch of changes) whenever `type` or anything inside it changes. A whole
 * document's state from the opening request (origin PRIMED) bumps it in a task of its own: applying a
 * layer and re-resolving and laying out its segments are each long, and one task doing both blocked the
 * page for longer than the 50 ms a person notices (issue 11).
 */
function version(types: Array<Y.AbstractType<any>>): Accessor<number> & { primed: () => boolean } {
  const [v, setV] = createSignal(0);
  let queued = false;
  let primed = false;
  const run = () => {
    queued = false;
    setV((n) => n + 1);
    // (what the bump recomputed has run by now: only it reads the bump as primed)
    primed = false;
  };
  const bump = (_events: unknown, transaction: Y.Transaction) => {
    if (queued) return;
    queued = true;
    primed = transaction.origin === PRIMED;
    if (primed) nextInOwnTask(run);
    else queueMicrotask(run);
  };
  for (const t of types) t.observeDeep(bump);
  onCleanup(() => types.forEach((t) => t.unobserveDeep(bump)));
  /** The latest bump came from a whole state of the opening request. */
  return Object.assign(v, { primed: () => primed });
}

/**
 * What a layer's view draws: its resolved segments as they are, except after a whole state from the
 * opening request, when they follow in a task of their own (ahead of the states still waiting): resolving
 * 2,000 segments and then laying them out over every turn in one task took longer than 50 ms (issue 11).
 * Changes made while coding show in the same task, as before.
 */
function drawnLater(resolved: Accessor<Segment[]>, primed: () => boolean): Accessor<Segment[]> {
  const [drawn, setDrawn] = createSignal<Segment[]>([]);
  let live = true;
  onCleanup(() => (live = false));
  createComputed(() => {
    const list = resolved();
    if (!primed()) return void setDrawn(() => list);
    nextInOwnTask(() => {
      if (live && untrack(resolved) === list) setDrawn(() => list);
    });
  });
  return drawn;
}

/**
 * `allLayers` are every layer opened for the text (their observers are set up once, here);
 * `visible` says which of them are drawn and checked for flags.
 */
export function useCodingState(text: OpenDoc, allLayers: readonly LayerHandle[], visible: Accessor<LayerHandle[]>, codebook: OpenDoc, opts: { showDisagreement: Accessor<boolean> }): CodingState {
  const textV = version([getText(text.doc), text.doc.getArray('turns')]);
  const cbV = version([codebook.doc.getMap('codes'), codebook.doc.getMap('exclusiveSets'), codebook.doc.getMap('proposals'), codebook.doc.getMap('themes'), codebook.doc.getArray('changes')]);
  const layerVersions = new Map(allLayers.map((l) => [l.doc.room, version([l.doc.doc.getMap('segments')])]));
  const layerV = (l: LayerHandle) => layerVersions.get(l.doc.room)?.();

  const words = createMemo(() => (textV(), getText(text.doc).toString()));
  const turns = createMemo(() => viewTurns(readTurns(text.doc), words()));
  // one resolution per layer, redone only when that layer or the text changed
  const perLayer = new Map(allLayers.map((l) => [l.doc.room, drawnLater(createMemo(() => {
    textV();
    layerV(l);
    const t = turns();
    const records = listSegments(l.doc.doc);
    return resolveSegments(text.doc, records, t.length ? t : undefined).map((s, i): Segment => {
      const note = records[i]!.note;
      return note === undefined ? { ...s, coderId: l.coderId } : { ...s, coderId: l.coderId, note };
    });
  }), () => layerVersions.get(l.doc.room)!.primed())]));
  const segments = createMemo(() => {
    const out: Segment[] = [];
    for (const l of visible()) for (const s of perLayer.get(l.doc.room)?.() ?? []) out.push(s);
    return out.sort((a, b) => a.start - b.start || a.end - b.end);
  });
  // pending proposals (a coder's new or in vivo codes) show as "(proposed)" until the lead decides
  const codes = createMemo(() => (cbV(), codesInView(codebook.doc)));
  const codeById = createMemo(() => new Map(codes().map((c) => [c.id, c])));
  const marks = createMemo(() => assignMarks(codes()));
  const exclusiveSets = createMemo(() => (cbV(), listExclusiveSets(codebook.doc)));
  const themes = createMemo(() => (cbV(), listThemes(codebook.doc)));
  const lastEdits = createMemo(() => (cbV(), lastDefinitionEdits(codebook.doc)));
  const source = useFlags(text, codebook, allLayers, visible, () => !opts.showDisagreement());
  const flags = source.flags;
  const flagsChecking = source.checking;
  const layerSegments = new Map(allLayers.map((l) => [l.coderId, perLayer.get(l.doc.room)!]));
  return { turns, words, segments, layerSegments, codes, codeById, marks, exclusiveSets, themes, lastEdits, flags, flagsChecking };
}

/** Turns with their words; a text without a turns array is read one turn per line. */
export function viewTurns(turns: ResolvedTurn[], words: string): ViewTurn[] {
  if (turns.length === 0) {
    const out: ViewTurn[] = [];
    let at = 0;
    words.split('\n').forEach((line, index) => {
      out.push({ index, speaker: null, startMs: null, endMs: null, start: at, end: at + line.length, words: line });
      at += line.length + 1;
    });
    return out;
  }
  return turns.map((t) => {
    let end = t.end;
    if (end > t.start && words[end - 1] === '\n') end--;
    return { ...t, end, words: words.slice(t.start, end) };
  });
}
