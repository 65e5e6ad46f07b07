/**
 * A switch for whose coding the transcript shows: mine, the consensus layer, everyone else's, or all.
 * Only layers the server opened for this person are offered (it decides who may read whose layer), so
 * "others" appears only where it lets them. The checkboxes below it still pick layers one by one.
 */
import { For, Show, createMemo } from 'solid-js';
import type { LayerHandle } from './coding-state.js';

type Choice = 'mine' | 'consensus' | 'others' | 'all';

export function WhoseCoding(props: { layers: readonly LayerHandle[]; hidden: ReadonlySet<string>; setHidden: (h: Set<string>) => void }) {
  const groups = createMemo(() => {
    const g: Record<Choice, string[]> = { mine: [], consensus: [], others: [], all: [] };
    for (const l of props.layers) {
      g.all.push(l.coderId);
      if (l.mine) g.mine.push(l.coderId);
      else if (l.kind === 'consensus') g.consensus.push(l.coderId);
      else g.others.push(l.coderId);
    }
    return g;
  });
  const offered = createMemo(() => {
    const g = groups();
    const out: Array<[Choice, string]> = [];
    if (g.mine.length) out.push(['mine', 'Mine']);
    if (g.consensus.length) out.push(['consensus', 'Consensus']);
    if (g.others.length) out.push(['others', g.others.length === 1 ? 'The other coder' : 'Other coders']);
    if (out.length > 1) out.push(['all', 'All']);
    return out;
  });
  const current = (): Choice | null => {
    const shown = new Set(props.layers.map((l) => l.coderId).filter((id) => !props.hidden.has(id)));
    for (const [c] of offered()) {
      const ids = groups()[c];
      if (ids.length === shown.size && ids.every((id) => shown.has(id))) return c;
    }
    return null;
  };
  const choose = (c: Choice) => {
    const keep = new Set(groups()[c]);
    props.setHidden(new Set(props.layers.map((l) => l.coderId).filter((id) => !keep.has(id))));
  };
  return (
    <Show when={offered().length > 1}>
      <div class="whose" role="radiogroup" aria-label="Whose coding is shown" data-testid="whose-coding">
        <For each={offered()}>
          {([c, label]) => (
            <label class="whose-option">
              <input type="radio" name="whose-coding" checked={current() === c} onChange={() => choose(c)} /> {label}
            </label>
          )}
        </For>
      </div>
    </Show>
  );
}
