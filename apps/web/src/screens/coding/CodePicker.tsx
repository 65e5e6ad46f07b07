/** Type-ahead over the codebook: arrows choose, Enter applies; every code is also a button. */
import { For, Show, createMemo, createSignal } from 'solid-js';
import type { CodeMark, CodeView } from '@gloss/model';
import { CodeSwatch } from '../../ui/CodeSwatch.js';

export function matchCodes(codes: readonly CodeView[], query: string): CodeView[] {
  const q = query.trim().toLowerCase();
  const live = codes.filter((c) => c.status === 'active' || c.status === 'draft');
  if (!q) return live;
  const starts = live.filter((c) => c.label.toLowerCase().replace(/^[“"]/, '').startsWith(q));
  const inside = live.filter((c) => !starts.includes(c) && (c.label.toLowerCase().includes(q) || c.briefDefinition.toLowerCase().includes(q)));
  return [...starts, ...inside];
}

export function CodePicker(props: {
  codes: readonly CodeView[];
  marks: ReadonlyMap<string, CodeMark>;
  recent: readonly string[];
  mode: 'apply' | 'recode';
  disabled: boolean;
  onPick: (codeId: string) => void;
  onDone: () => void;
  inputRef: (el: HTMLInputElement) => void;
}) {
  const [query, setQuery] = createSignal('');
  const [active, setActive] = createSignal(0);
  const matches = createMemo(() => matchCodes(props.codes, query()));
  const byId = createMemo(() => new Map(props.codes.map((c) => [c.id, c])));
  const pick = (id: string) => {
    props.onPick(id);
    setQuery('');
    setActive(0);
  };
  const onKey = (e: KeyboardEvent) => {
    if (e.key === 'ArrowDown') { e.preventDefault(); setActive((a) => Math.min(matches().length - 1, a + 1)); }
    else if (e.key === 'ArrowUp') { e.preventDefault(); setActive((a) => Math.max(0, a - 1)); }
    else if (e.key === 'Enter') {
      e.preventDefault();
      const c = matches()[active()];
      if (c) pick(c.id);
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
        Find a code
        <input
          ref={props.inputRef}
          type="search"
          role="combobox"
          aria-expanded="true"
          aria-controls="code-options"
          aria-activedescendant={matches()[active()] ? `opt-${matches()[active()]!.id}` : undefined}
          value={query()}
          onInput={(e) => { setQuery(e.currentTarget.value); setActive(0); }}
          onKeyDown={onKey}
          placeholder="type to filter, Enter applies"
          data-testid="code-search"
        />
      </label>
      <ul id="code-options" role="listbox" aria-label="Codes" class="code-options">
        <For each={matches()} fallback={<li class="muted">No code matches.</li>}>
          {(c, i) => (
            <li id={`opt-${c.id}`} role="option" aria-selected={i() === active()} classList={{ active: i() === active() }}>
              <button type="button" disabled={props.disabled} onClick={() => pick(c.id)} tabindex="-1" title={c.briefDefinition}>
                <CodeSwatch mark={props.marks.get(c.id)} /> {c.label}
                <Show when={c.status === 'draft'}> <span class="tag">draft</span></Show>
              </button>
            </li>
          )}
        </For>
      </ul>
    </section>
  );
}
