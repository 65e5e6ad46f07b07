/**
 * Type-ahead over the whole codebook: its hierarchy (children indented under their parent) and themes,
 * recently used codes first. The WAI-ARIA Authoring Practices' combobox pattern (an editable combobox
 * with a listbox popup, focus kept in the field through aria-activedescendant): arrows, Home/End with
 * Ctrl, PageUp/PageDown choose, Enter applies, a click on an option applies. Options hold no controls
 * (the listbox pattern forbids it); the one per-code action, "Seen" on an updated definition, lives in
 * the card below the list. The chosen code's brief definition and when (not) to use it are shown in
 * that card of our own, not a tooltip.
 */
import { fieldWords } from '../codebook/field-words.js';
import { For, Show, createMemo, createSignal } from 'solid-js';
import type { ChangeEntry, CodeGroup, CodeMark, CodeView } from '@gloss/model';
import { CodeSwatch } from '../../ui/CodeSwatch.js';
import { codeList } from './code-list.js';

/** Options moved by PageUp/PageDown (about a screenful of the list). */
const PAGE = 10;

export function CodePicker(props: {
  codes: readonly CodeView[];
  themes: readonly CodeGroup[];
  marks: ReadonlyMap<string, CodeMark>;
  recent: readonly string[];
  mode: 'apply' | 'recode';
  disabled: boolean;
  onPick: (codeId: string) => void;
  onDone: () => void;
  inputRef: (el: HTMLInputElement) => void;
  /** The definition edit this person has not seen yet, if any (an "updated" mark until they open it). */
  unseenEdit: (codeId: string) => ChangeEntry | undefined;
  onSeen: (codeId: string) => void;
}) {
  const [query, setQuery] = createSignal('');
  const [active, setActive] = createSignal(0);
  const matches = createMemo(() => codeList(props.codes, props.themes, props.recent, query()));
  const byId = createMemo(() => new Map(props.codes.map((c) => [c.id, c])));
  const current = () => matches()[active()];
  const pick = (id: string) => {
    props.onPick(id);
    setQuery('');
    setActive(0);
  };
  let listEl: HTMLUListElement | undefined;
  const moveTo = (i: number) => {
    setActive(i);
    const c = matches()[i];
    if (c) listEl?.querySelector(`#opt-${CSS.escape(c.code.id)}`)?.scrollIntoView({ block: 'nearest' });
  };
  const onKey = (e: KeyboardEvent) => {
    const last = matches().length - 1;
    if (e.key === 'ArrowDown') { e.preventDefault(); moveTo(Math.min(last, active() + 1)); }
    else if (e.key === 'ArrowUp') { e.preventDefault(); moveTo(Math.max(0, active() - 1)); }
    else if (e.key === 'PageDown') { e.preventDefault(); moveTo(Math.min(last, active() + PAGE)); }
    else if (e.key === 'PageUp') { e.preventDefault(); moveTo(Math.max(0, active() - PAGE)); }
    else if (e.ctrlKey && e.key === 'End') { e.preventDefault(); moveTo(Math.max(0, last)); }
    else if (e.ctrlKey && e.key === 'Home') { e.preventDefault(); moveTo(0); }
    else if (e.key === 'Enter') {
      e.preventDefault();
      const c = current();
      if (c) pick(c.code.id);
    } else if (e.key === 'Escape') { e.preventDefault(); setQuery(''); props.onDone(); }
  };
  return (
    <section class="picker" aria-labelledby="picker-h">
      <h2 id="picker-h">{props.mode === 'recode' ? 'Recode the chosen segment' : 'Apply a code to the selection'}</h2>
      <Show when={props.recent.length > 0}>
        <div class="recent" aria-label="Recently used codes">
          <For each={props.recent.filter((id) => byId().has(id)).slice(0, 9)}>
            {(id, i) => (
              <button type="button" class="chip" disabled={props.disabled} onClick={() => pick(id)} aria-keyshortcuts={String(i() + 1)}>
                <kbd>{i() + 1}</kbd> <CodeSwatch mark={props.marks.get(id)} /> {byId().get(id)?.label}
              </button>
            )}
          </For>
        </div>
      </Show>
      <label>
        Find a code <span class="muted">({matches().length} of {props.codes.filter((c) => c.status === 'active' || c.status === 'draft').length})</span>
        <input
          ref={props.inputRef}
          type="search"
          role="combobox"
          aria-expanded="true"
          aria-controls="code-options"
          aria-activedescendant={current() ? `opt-${current()!.code.id}` : undefined}
          value={query()}
          onInput={(e) => { setQuery(e.currentTarget.value); setActive(0); }}
          onKeyDown={onKey}
          placeholder="name, definition or theme"
          data-testid="code-search"
        />
      </label>
      <ul id="code-options" role="listbox" aria-label="Codes" class="code-options" ref={listEl}>
        <For each={matches()}>
          {(e, i) => (
            <li
              id={`opt-${e.code.id}`}
              role="option"
              aria-selected={i() === active()}
              aria-disabled={props.disabled}
              classList={{ active: i() === active() }}
              style={{ 'padding-left': `${8 + (query() || e.recent ? 0 : e.depth) * 16}px` }}
              // focus stays in the search field (the combobox), as the pattern asks; a click applies
              onMouseDown={(ev) => ev.preventDefault()}
              onClick={() => { setActive(i()); if (!props.disabled) pick(e.code.id); }}
              onMouseEnter={() => setActive(i())}
            >
              <CodeSwatch mark={props.marks.get(e.code.id)} /> {e.code.label}
              <Show when={e.code.status === 'draft'}> <span class="tag">draft</span></Show>
              <Show when={props.unseenEdit(e.code.id)}> <span class="tag updated" data-testid="updated-mark" aria-hidden="true">updated</span></Show>
              <Show when={(query() || e.recent) && e.path.length > 0}> <span class="muted code-where" aria-hidden="true">in {e.path.join(' › ')}</span></Show>
              <Show when={e.themes.length > 0}> <span class="muted code-where" aria-hidden="true">· {e.themes.join(', ')}</span></Show>
            </li>
          )}
        </For>
      </ul>
      <Show when={matches().length === 0}><p class="muted" data-testid="no-code-matches">No code matches.</p></Show>
      <Show when={current()} keyed>
        {(e) => (
          <div class="code-card" data-testid="code-card" aria-live="polite">
            <strong>{e.code.label}</strong>
            <Show when={e.code.briefDefinition} fallback={<p class="muted">No definition yet.</p>}><p>{e.code.briefDefinition}</p></Show>
            <Show when={e.code.inclusion}><p><span class="muted">Use when:</span> {e.code.inclusion}</p></Show>
            <Show when={e.code.exclusion}><p><span class="muted">Not when:</span> {e.code.exclusion}</p></Show>
            <Show when={props.unseenEdit(e.code.id)}>
              {(edit) => (
                <div class="card-updated" data-testid="card-updated">
                  <p><span class="tag updated">updated</span> {edit().field ? `${fieldWords(edit().field!)}, ` : ''}{new Date(edit().at).toLocaleString()}{edit().reason ? ` — why: ${edit().reason}` : ''}</p>
                  <p class="edit-diff"><del>{edit().before || '(empty)'}</del> → <ins>{edit().after || '(empty)'}</ins></p>
                  <button type="button" class="quiet" onClick={() => props.onSeen(e.code.id)}>Seen</button>
                </div>
              )}
            </Show>
          </div>
        )}
      </Show>
    </section>
  );
}
