import { For } from 'solid-js';
import type { Flag } from '../../doc/flag-view.js';

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
export function FlagList(props: { flags: readonly Flag[]; onGo: (f: Flag) => void }) {
  return (
    <section aria-labelledby="flags-h" class="flags">
      <h2 id="flags-h">Flags <span class="count" data-testid="flag-count">{props.flags.length}</span></h2>
      <ul aria-live="polite">
        <For each={props.flags} fallback={<li class="muted">No flags on this text.</li>}>
          {(f) => (
            <li>
              <button type="button" class="flag" data-kind={f.kind} onClick={() => props.onGo(f)}>
                <strong>{KIND[f.kind]}</strong>: {f.message}
              </button>
            </li>
          )}
        </For>
      </ul>
    </section>
  );
}
