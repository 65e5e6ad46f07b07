import { createSignal, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { createSubmit } from '../../ui/forms.js';
import { go } from '../../ui/router.js';

/**
 * Deleting the whole study (owner): the person types the title to confirm, having read what goes.
 * The server removes every row of it in one transaction and keeps one audit entry of ids and counts.
 */
export function DeleteStudy(props: { studyId: string; title: string }) {
  const [typed, setTyped] = createSignal('');
  const submit = createSubmit();
  const remove = (e: Event) => {
    e.preventDefault();
    void submit.run(async () => {
      await setupApi.deleteStudy(props.studyId);
      go({ name: 'studies' });
    });
  };
  return (
    <section aria-labelledby="delete-study-h" class="danger-zone">
      <h3 id="delete-study-h">Delete this study</h3>
      <p>
        Deleting removes, for everyone and at once: every text and its edit history, every coder’s layers and segments,
        the codebook, memos and jottings, comments, calibration rounds, cases and attributes, named versions, invitations,
        the pseudonym key and the study’s audit log. One entry without any content records that the study was deleted.
        It cannot be undone: export what your ethics approval asks you to keep first.
      </p>
      <form onSubmit={remove} class="stacked" aria-label="Delete this study">
        <label>
          Type the study’s title to confirm
          <input value={typed()} onInput={(e) => setTyped(e.currentTarget.value)} autocomplete="off" />
        </label>
        <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
        <button type="submit" class="danger" disabled={submit.busy() || typed().trim() !== props.title.trim()}>Delete the study and all its data</button>
      </form>
    </section>
  );
}
