import { createSignal, Show } from 'solid-js';
import { fullLink, when } from './forms.js';

/** A link shown once, to copy and send by one's own means (Gloss sends no mail). */
export function CopyLink(props: { path: string; expiresAt: string; label: string }) {
  const [copied, setCopied] = createSignal('');
  const copy = async () => {
    try {
      await navigator.clipboard.writeText(fullLink(props.path));
      setCopied('Copied.');
    } catch {
      setCopied('Copying was refused by the browser: select the link and copy it yourself.');
    }
  };
  return (
    <div class="copy-link" role="group" aria-label={props.label}>
      <label>
        {props.label}
        <input type="text" readOnly value={fullLink(props.path)} onFocus={(e) => e.currentTarget.select()} data-testid="link" />
      </label>
      <div class="row">
        <button type="button" onClick={() => void copy()}>Copy link</button>
        <span class="muted">Works once, until {when(props.expiresAt)}. Send it yourself (chat, mail); anyone holding it can use it.</span>
        <Show when={copied()}><span role="status">{copied()}</span></Show>
      </div>
    </div>
  );
}
