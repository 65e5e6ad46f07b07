/** One definition field of a codebook entry, co-edited live: bound to its Y.Text, with others' carets drawn on it. */
import { For, createEffect, createSignal, onCleanup, onMount } from 'solid-js';
import type * as Y from 'yjs';
import type { Awareness } from 'y-protocols/awareness';
import { bindField } from '../../ui/ytext-binding.js';
import { caretCoordinates, readEditors, type FieldEditor } from './field-presence.js';

/** After this long without typing, a run of edits counts as finished and goes into the code's history. */
const PAUSE_MS = 3000;

export function DefinitionField(props: {
  codeId: string; field: string; label: string; ytext: Y.Text; awareness: Awareness; readOnly: boolean; rows?: number;
  /** A run of this person's typing ended (they left the field or paused): the text before and after it. */
  onRun?: (before: string, after: string) => void;
}) {
  let el!: HTMLTextAreaElement;
  // the text when this person's current run of typing began (null: not typing)
  let before: string | null = null;
  let pause: ReturnType<typeof setTimeout> | undefined;
  const endRun = () => {
    clearTimeout(pause);
    if (before === null) return;
    const after = props.ytext.toString();
    const was = before;
    before = null;
    if (was !== after) props.onRun?.(was, after);
  };
  const typed = () => {
    if (props.readOnly || !props.onRun) return;
    before ??= lastSeen;
    clearTimeout(pause);
    pause = setTimeout(endRun, PAUSE_MS);
  };
  // the field's text as it was just before this person's latest keystroke
  let lastSeen = props.ytext.toString();
  onCleanup(endRun);
  const [editors, setEditors] = createSignal<FieldEditor[]>([]);
  const [marks, setMarks] = createSignal<Array<FieldEditor & { x: number; y: number; h: number }>>([]);
  const publish = () => {
    if (document.activeElement !== el) return;
    props.awareness.setLocalStateField('editing', { codeId: props.codeId, field: props.field, at: el.selectionStart ?? 0 });
  };
  onMount(() => {
    const unbind = bindField(el, props.ytext, { readOnly: props.readOnly });
    const onAw = () => setEditors(readEditors(props.awareness).filter((e) => e.codeId === props.codeId && e.field === props.field));
    props.awareness.on('change', onAw);
    onAw();
    const onText = () => queueMicrotask(() => setEditors((e) => [...e]));
    props.ytext.observe(onText);
    onCleanup(() => {
      unbind();
      props.awareness.off('change', onAw);
      props.ytext.unobserve(onText);
    });
  });
  createEffect(() => setMarks(editors().map((e) => ({ ...e, ...caretCoordinates(el, Math.min(e.at, el.value.length)) }))));
  const id = `f-${props.codeId}-${props.field}`;
  return (
    <div class="def-field">
      <label for={id}>{props.label}</label>
      <div class="field-wrap">
        <textarea
          id={id}
          ref={el}
          rows={props.rows ?? 3}
          data-field={props.field}
          onFocus={publish}
          onKeyUp={publish}
          onClick={publish}
          onBeforeInput={() => { lastSeen = props.ytext.toString(); }}
          onInput={() => { publish(); typed(); }}
          onBlur={() => { props.awareness.setLocalStateField('editing', null); endRun(); }}
        />
        <For each={marks()}>
          {(m) => (
            <span class="field-caret" style={{ left: `${m.x}px`, top: `${m.y}px`, height: `${m.h}px`, background: m.colour }} aria-hidden="true">
              <span class="caret-name" style={{ background: m.colour }}>{m.name}</span>
            </span>
          )}
        </For>
      </div>
      <For each={editors()}>{(e) => <span class="sr-only">{e.name} is editing this field.</span>}</For>
    </div>
  );
}
