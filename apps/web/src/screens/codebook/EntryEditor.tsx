/** A codebook entry: label, definition fields (live, co-edited), type, status, colour, examples, history. */
import { For, Show, createSignal } from 'solid-js';
import type * as Y from 'yjs';
import type { Awareness } from 'y-protocols/awareness';
import {
  CODE_STATUSES, CODE_TYPES, getDefinitionText, recordDefinitionEdit, removeExample, renameCode, updateCodeField,
  type ChangeEntry, type CodeView, type DefinitionField as Field,
} from '@gloss/model';
import { DefinitionField } from './DefinitionField.js';
import { createAttempt } from '../../ui/attempt.js';
import { OKABE_ITO } from '../../doc/palette.js';
import { fieldWords } from './field-words.js';

const FIELDS: Array<[Field, string, number]> = [
  ['briefDefinition', 'Brief definition', 2],
  ['fullDefinition', 'Full definition', 4],
  ['inclusion', 'When to use (inclusion)', 3],
  ['exclusion', 'When not to use (exclusion)', 3],
];

export function EntryEditor(props: {
  codebook: Y.Doc;
  awareness: Awareness;
  code: CodeView;
  codes: Map<string, CodeView>;
  history: ChangeEntry[];
  nameOf: (userId: string) => string;
  canEdit: boolean;
  by: string;
}) {
  const { message, attempt } = createAttempt();
  const actor = () => ({ by: props.by });
  const [reason, setReason] = createSignal('');
  const [recorded, setRecorded] = createSignal('');
  const record = (field: Field, label: string, before: string, after: string) => attempt(() => {
    const why = reason().trim();
    if (recordDefinitionEdit(props.codebook, why ? { by: props.by, reason: why } : { by: props.by }, props.code.id, field, before, after)) {
      setReason('');
      setRecorded(`${label} change recorded in the history${why ? ' with your reason' : ''}; coders see the code marked “updated”.`);
    }
  });
  return (
    <article class="entry" aria-labelledby="entry-h" data-testid="entry-editor">
      <h2 id="entry-h">{props.code.label}</h2>
      <Show when={props.code.mergedInto}>
        <p class="muted">Merged into {props.codes.get(props.code.mergedInto!)?.label ?? 'another code'}.</p>
      </Show>
      <Show when={props.canEdit}>
        <label>Label
          <input value={props.code.label} onChange={(e) => attempt(() => renameCode(props.codebook, props.code.id, e.currentTarget.value, actor()))} />
        </label>
      </Show>
      <For each={FIELDS}>
        {([f, label, rows]) => (
          <DefinitionField codeId={props.code.id} field={f} label={label} rows={rows} ytext={getDefinitionText(props.codebook, props.code.id, f)} awareness={props.awareness} readOnly={!props.canEdit}
            onRun={props.canEdit ? (b, a) => record(f, label, b, a) : undefined} />
        )}
      </For>
      <Show when={props.canEdit}>
        <label>Grounds for the next definition change <span class="muted">(optional; recorded with it)</span>
          <input value={reason()} onInput={(e) => setReason(e.currentTarget.value)} data-testid="edit-reason" />
        </label>
        <p class="muted" role="status" data-testid="edit-recorded">{recorded()}</p>
      </Show>
      <div class="row">
        <label>Type
          <select disabled={!props.canEdit} value={props.code.type} onChange={(e) => attempt(() => updateCodeField(props.codebook, props.code.id, 'type', e.currentTarget.value, actor()))}>
            <For each={CODE_TYPES}>{(t) => <option value={t}>{t}</option>}</For>
          </select>
        </label>
        <label>Status
          <select disabled={!props.canEdit} value={props.code.status} onChange={(e) => attempt(() => updateCodeField(props.codebook, props.code.id, 'status', e.currentTarget.value, actor()))}>
            <For each={CODE_STATUSES}>{(t) => <option value={t}>{t}</option>}</For>
          </select>
        </label>
        <label>Colour (Okabe &amp; Ito)
          <select disabled={!props.canEdit} value={props.code.colour} onChange={(e) => attempt(() => updateCodeField(props.codebook, props.code.id, 'colour', e.currentTarget.value, actor()))}>
            <For each={[...new Set([props.code.colour, ...OKABE_ITO])]}>{(c) => <option value={c}>{c}</option>}</For>
          </select>
        </label>
      </div>
      <Show when={message()}><p class="error" role="alert">{message()}</p></Show>
      <section aria-label="Examples">
        <h3>Examples</h3>
        <Examples list={props.code.examples} canEdit={props.canEdit} onRemove={(id) => attempt(() => removeExample(props.codebook, props.code.id, id, actor()))} />
        <h3>Near-misses</h3>
        <Examples list={props.code.nearMisses} canEdit={props.canEdit} onRemove={(id) => attempt(() => removeExample(props.codebook, props.code.id, id, actor()))} />
        <p class="muted">Pick examples and near-misses from real segments in the coding view (“Use as example”).</p>
      </section>
      <details class="history">
        <summary>Change history ({props.history.length})</summary>
        <ol>
          <For each={[...props.history].reverse()}>
            {(h) => (
              <li>
                <time dateTime={new Date(h.at).toISOString()}>{new Date(h.at).toLocaleString()}</time> — {props.nameOf(h.by)}: {h.kind}
                {h.field ? ` (${fieldWords(h.field)})` : ''}{h.detail ? ` ${h.detail}` : ''}{h.reason ? ` — why: ${h.reason}` : ''} <span class="muted">round {h.round}</span>
                <Show when={h.before !== undefined}>
                  <div class="edit-diff"><del>{h.before || '(empty)'}</del> → <ins>{h.after || '(empty)'}</ins></div>
                </Show>
              </li>
            )}
          </For>
        </ol>
      </details>
    </article>
  );
}

function Examples(props: { list: CodeView['examples']; canEdit: boolean; onRemove: (id: string) => void }) {
  return (
    <ul class="examples">
      <For each={props.list} fallback={<li class="muted">None yet.</li>}>
        {(e) => (
          <li>
            <q>{e.quote}</q>
            <Show when={props.canEdit}> <button type="button" class="link" onClick={() => props.onRemove(e.id)}>remove</button></Show>
          </li>
        )}
      </For>
    </ul>
  );
}
