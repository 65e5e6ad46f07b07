import { Show, type JSX } from 'solid-js';
import { errorMessage } from '../api/errors.js';

/** Shows a resource's error in words, or a progress line while it loads. */
export function Loading(props: { error?: unknown; loading: boolean; what: string; children: JSX.Element }) {
  return (
    <Show when={!props.error} fallback={<p class="error" role="alert">Could not load {props.what}: {errorMessage(props.error)}</p>}>
      <Show when={!props.loading} fallback={<p class="progress" role="progressbar" aria-label={`Loading ${props.what}`}>Loading {props.what}…</p>}>
        {props.children}
      </Show>
    </Show>
  );
}
