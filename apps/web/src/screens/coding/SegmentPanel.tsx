/** The chosen segment: its code, words, coder and note, and what may be done to it. */
import { Show, createEffect, createSignal } from 'solid-js';
import type { CodeMark, CodeView } from '@gloss/model';
import type { Segment } from '../../doc/flag-view.js';
import { CodeSwatch } from '../../ui/CodeSwatch.js';

export function SegmentPanel(props: {
  segment: Segment;
  code: CodeView | undefined;
  mark: CodeMark | undefined;
  coderName: string;
  mine: boolean;
  hasSelection: boolean;
  onRecode: () => void;
  onRemove: () => void;
  onFit: () => void;
  onResize: (edge: 'start' | 'end', dir: 1 | -1) => void;
  onNote: (note: string) => void;
  onExample?: (kind: 'example' | 'near-miss') => void;
  /** The segment carries `stale-definition`: its code's definition changed in a later round. */
  stale?: boolean;
  /** Its coder marks it re-checked against the current definition (clears the flag). */
  onRecheck?: () => void;
  noteRef: (el: HTMLTextAreaElement) => void;
}) {
  const [note, setNote] = createSignal(props.segment.note ?? '');
  createEffect(() => setNote(props.segment.note ?? ''));
  return (
    <section class="segment-panel" aria-labelledby="seg-h" data-testid="segment-panel">
      <h2 id="seg-h">
        <CodeSwatch mark={props.mark} /> {props.code?.label ?? 'Unknown code'}
      </h2>
      <blockquote data-testid="segment-quote">{props.segment.orphaned ? '(all its words were deleted)' : props.segment.quote}</blockquote>
      <p class="muted">Coder: {props.coderName}</p>
      <Show when={props.stale}>
        <div class="stale-note" data-testid="stale-definition">
          <p>The definition of {props.code?.label ?? 'this code'} changed in a later round, after this was coded.</p>
          <Show when={props.mine && props.onRecheck} fallback={<p class="muted">Its coder re-checks it.</p>}>
            <button type="button" class="quiet" onClick={() => props.onRecheck!()}>Re-checked: still fits</button>
          </Show>
        </div>
      </Show>
      <Show when={props.mine} fallback={<Show when={props.segment.note}><p>Note: {props.segment.note}</p></Show>}>
        <div class="row">
          <button type="button" onClick={props.onRecode} aria-keyshortcuts="r">Recode…</button>
          <button type="button" class="danger" onClick={props.onRemove} aria-keyshortcuts="Delete">Remove</button>
          <button type="button" class="quiet" disabled={!props.hasSelection} onClick={props.onFit}>Fit to selection</button>
        </div>
        <div class="row" role="group" aria-label="Resize">
          <button type="button" class="quiet" onClick={() => props.onResize('start', -1)} aria-label="Start one word earlier" aria-keyshortcuts="Shift+Alt+ArrowLeft">⇤ start</button>
          <button type="button" class="quiet" onClick={() => props.onResize('start', 1)} aria-label="Start one word later" aria-keyshortcuts="Shift+Alt+ArrowRight">start ⇥</button>
          <button type="button" class="quiet" onClick={() => props.onResize('end', -1)} aria-label="End one word earlier" aria-keyshortcuts="Alt+ArrowLeft">⇤ end</button>
          <button type="button" class="quiet" onClick={() => props.onResize('end', 1)} aria-label="End one word later" aria-keyshortcuts="Alt+ArrowRight">end ⇥</button>
        </div>
        <label>
          Note on this segment <span class="muted">(kept with your coding; a jotting goes to the study's memos instead)</span>
          <textarea ref={props.noteRef} rows="2" value={note()} onInput={(e) => setNote(e.currentTarget.value)} onBlur={() => note() !== (props.segment.note ?? '') && props.onNote(note())} />
        </label>
      </Show>
      <Show when={props.onExample}>
        <div class="row">
          <button type="button" class="quiet" onClick={() => props.onExample!('example')}>Use as example</button>
          <button type="button" class="quiet" onClick={() => props.onExample!('near-miss')}>Use as near-miss</button>
        </div>
      </Show>
    </section>
  );
}
