import { For } from 'solid-js';
import type { StudyScope } from './study-context.js';

/** Who is in the study right now and which text each has open. */
export function PresenceList(props: { scope: StudyScope }) {
  return (
    <ul class="presence" aria-label="People in this study now" data-testid="presence">
      <For each={props.scope.presence()} fallback={<li class="muted">Nobody else is here.</li>}>
        {(p) => (
          <li>
            <span class="swatch" style={{ background: p.colour }} aria-hidden="true" /> {p.name}
            <span class="muted"> — {p.textTitle ? `in “${p.textTitle}”` : 'browsing the study'}</span>
          </li>
        )}
      </For>
    </ul>
  );
}
