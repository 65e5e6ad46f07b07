import { For, Show, createMemo, createSignal } from 'solid-js';
import { describeFlag, type Flag } from '../../doc/flag-view.js';
import type { FlagSet } from '../../doc/flag-pack.js';
import type { CodeView } from '@gloss/model';

const KIND: Record<Flag['kind'], string> = {
  exclusive: 'Exclusive codes together',
  duplicate: 'Same code twice',
  'retired-code': 'Retired or merged code',
  orphaned: 'Words deleted',
  disagreement: 'Coders differ',
  'definition-race': 'Definition edited at once',
  'stale-definition': 'Definition changed since',
};

/** Live flags on this text; each goes to its segment. */
const PAGE = 50;

export function FlagList(props: { flags: FlagSet; checking: boolean; codes: ReadonlyMap<string, CodeView>; onGo: (f: Flag) => void }) {
  // a busy text can carry thousands of flags: list a page at a time, with counts per kind
  const [limit, setLimit] = createSignal(PAGE);
  const counts = createMemo(() => {
    const c = new Map<Flag['kind'], number>();
    const flags = props.flags;
    for (let i = 0; i < flags.length; i++) c.set(flags.kindAt(i), (c.get(flags.kindAt(i)) ?? 0) + 1);
    return [...c];
  });
  return (
    <section aria-labelledby="flags-h" class="flags">
      <h2 id="flags-h">Flags <span class="count" data-testid="flag-count">{props.checking && props.flags.length === 0 ? '…' : props.flags.length}</span></h2>
      <Show when={counts().length > 1}>
        <p class="muted">{counts().map(([k, n]) => `${KIND[k]}: ${n}`).join(' · ')}</p>
      </Show>
      <ul aria-live="polite">
        <For each={Array.from({ length: Math.min(limit(), props.flags.length) }, (_, i) => props.flags.at(i))} fallback={<li class="muted" data-testid="no-flags">{props.checking ? 'Looking for flags…' : 'No flags on this text.'}</li>}>
          {(f) => (
            <li>
              <button type="button" class="flag" data-kind={f.kind} onClick={() => props.onGo(f)}>
                <strong>{KIND[f.kind]}</strong>: {describeFlag(f, props.codes)}
              </button>
            </li>
          )}
        </For>
      </ul>
      <Show when={props.flags.length > limit()}>
        <button type="button" class="quiet" onClick={() => setLimit(limit() + PAGE * 4)}>Show more ({props.flags.length - limit()} left)</button>
      </Show>
    </section>
  );
}
