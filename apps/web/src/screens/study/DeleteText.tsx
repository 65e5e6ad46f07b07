import { createSignal, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { createSubmit } from '../../ui/forms.js';

/** A text's delete button with a confirmation that says what goes; owners and leads only (the server decides). */
export function DeleteText(props: { textId: string; title: string; onDeleted: () => void }) {
  const [asking, setAsking] = createSignal(false);
  const submit = createSubmit();
  const remove = () => void submit.run(async () => {
    await setupApi.deleteText(props.textId);
    props.onDeleted();
  });
  return (
    <Show when={asking()} fallback={<button type="button" class="quiet" onClick={() => setAsking(true)} aria-label={`Delete ${props.title}`}>Delete…</button>}>
      <div role="alertdialog" aria-label={`Delete ${props.title}?`} class="confirm">
        <p>
          Delete <strong>{props.title}</strong>? This removes the transcript, every coder’s layer and segments on it, comments,
          its named versions and its whole edit history, for everyone, now. It cannot be undone. Memos and codebook examples
          that quote it stay until you edit them.
        </p>
        <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
        <button type="button" class="danger" disabled={submit.busy()} onClick={remove}>Delete the text for good</button>{' '}
        <button type="button" class="quiet" onClick={() => setAsking(false)}>Keep it</button>
      </div>
    </Show>
  );
}
