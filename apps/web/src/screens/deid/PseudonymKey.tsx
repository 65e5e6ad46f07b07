import { createResource, createSignal, For, Show } from 'solid-js';
import { deidApi } from '../../api/deid-api.js';
import { createSubmit, when } from '../../ui/forms.js';

/** The study's pseudonym key, for the owner only: read it, export it once, delete it. */
export function PseudonymKey(props: { studyId: string; changes: number }) {
  // read again after each apply (`changes` counts them)
  const [key, { refetch }] = createResource(() => [props.studyId, props.changes] as const, ([id]) => deidApi.key(id));
  const [shown, setShown] = createSignal(false);
  const [confirmDelete, setConfirmDelete] = createSignal(false);
  const submit = createSubmit();
  const exportOnce = () =>
    void submit.run(async () => {
      const csv = await deidApi.exportKey(props.studyId);
      const a = document.createElement('a');
      a.href = URL.createObjectURL(new Blob([csv], { type: 'text/csv' }));
      a.download = 'pseudonym-key.csv';
      a.click();
      URL.revokeObjectURL(a.href);
      await refetch();
    });
  const remove = () =>
    void submit.run(async () => {
      await deidApi.deleteKey(props.studyId);
      setConfirmDelete(false);
      await refetch();
    });
  return (
    <section aria-labelledby="key-h">
      <h3 id="key-h">4. The pseudonym key (only you, the owner, see this)</h3>
      <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
      <Show when={key()}>
        {(k) => (
          <>
            <p>
              {k().entries.length} entr{k().entries.length === 1 ? 'y' : 'ies'}.{' '}
              {k().exportedAt ? `Exported on ${when(k().exportedAt!)}; it cannot be exported again.` : 'Not exported yet: it can be exported once.'}
            </p>
            <p>
              <button type="button" class="quiet" onClick={() => setShown(!shown())} disabled={k().entries.length === 0}>{shown() ? 'Hide the key' : 'Show the key'}</button>{' '}
              <button type="button" class="quiet" onClick={exportOnce} disabled={submit.busy() || k().exportedAt !== null || k().entries.length === 0}>Export once (CSV)</button>{' '}
              <button type="button" class="danger" onClick={() => setConfirmDelete(true)} disabled={k().entries.length === 0}>Delete the key…</button>
            </p>
            <Show when={confirmDelete()}>
              <div role="alertdialog" aria-label="Delete the pseudonym key?" class="confirm">
                <p>Delete the key? Nobody can then tell from Gloss who a pseudonym stands for, and later finds cannot reuse its pseudonyms.</p>
                <button type="button" class="danger" onClick={remove}>Delete the key</button>{' '}
                <button type="button" class="quiet" onClick={() => setConfirmDelete(false)}>Keep it</button>
              </div>
            </Show>
            <Show when={shown()}>
              <table aria-label="Pseudonym key">
                <thead><tr><th scope="col">Pseudonym</th><th scope="col">Original</th><th scope="col">Kind</th></tr></thead>
                <tbody><For each={k().entries}>{(e) => <tr><td>{e.pseudonym}</td><td>{e.original}</td><td>{e.kind}</td></tr>}</For></tbody>
              </table>
            </Show>
          </>
        )}
      </Show>
    </section>
  );
}
