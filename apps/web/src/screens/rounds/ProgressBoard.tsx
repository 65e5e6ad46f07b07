/**
 * The lead's view of the independent phase: per participant and text, words read (turns that have
 * been on their screen), words coded, segments and "done". Progress only: which codes, and where, stay with each coder until the reveal.
 */
import { For, Show, createSignal, onCleanup } from 'solid-js';
import { countOf } from '../../ui/count-words.js';
import { roundsApi, type ProgressCell, type Round } from '../../api/rounds.js';
import { errorMessage } from '../../api/errors.js';

/** Progress is fetched at once and every `pollMs` while the board is shown; a failed fetch says why. */
export function ProgressBoard(props: { round: Round; pollMs: number }) {
  const [rows, setRows] = createSignal<ProgressCell[] | undefined>();
  const [error, setError] = createSignal('');
  let busy = false;
  const load = () => {
    if (busy) return;
    busy = true;
    roundsApi.progress(props.round.id).then(
      (r) => { setRows(r); setError(''); },
      (err: unknown) => setError(errorMessage(err)),
    ).finally(() => (busy = false));
  };
  load();
  const timer = setInterval(load, props.pollMs);
  onCleanup(() => clearInterval(timer));
  const cell = (participantId: string, textId: string) => rows()?.find((p) => p.participantId === participantId && p.textId === textId);
  const texts = () => props.round.texts;
  const doneCount = () => (rows() ?? []).filter((p) => p.done).length;
  const nameOf = (id: string) => props.round.participants.find((p) => p.id === id)?.name || 'a participant';
  return (
    <section aria-labelledby="progress-h" data-testid="progress-board">
      <h2 id="progress-h">Progress</h2>
      <p class="muted">
        <Show when={rows()} fallback={error() ? '' : 'Counting… '}>{doneCount()} of {countOf(props.round.participantIds.length * props.round.textIds.length, 'text')} marked done. </Show> Only progress is shown here:
        nobody, the lead included, sees anyone's codes before the reveal.
      </p>
      <Show when={error()}><p class="error" role="alert">The progress could not be fetched: {error()}</p></Show>
      <table class="progress-board">
        <thead>
          <tr>
            <th scope="col">Participant</th>
            <For each={texts()}>{(t) => <th scope="col">{t.title}</th>}</For>
          </tr>
        </thead>
        <tbody>
          <For each={props.round.participantIds}>
            {(pid) => (
              <tr>
                <th scope="row">{nameOf(pid)}</th>
                <For each={texts()}>
                  {(t) => {
                    const c = () => cell(pid, t.id);
                    return (
                      <td data-participant={pid} data-text={t.id} data-done={c()?.done ? 'yes' : 'no'}>
                        <Show when={c()} fallback={<span class="muted">not opened</span>}>
                          {(x) => (
                            <>
                              <span data-testid="words-read">{x().wordsRead ?? 0}{x().words ? ` of ${x().words}` : ''} words read</span>
                              <br />
                              <span>
                                {x().wordsCoded ?? 0} words coded, {countOf(x().segments, 'segment')}
                              </span>
                              <br />
                              <strong class={x().done ? 'done' : 'not-done'}>{x().done ? '✓ done' : 'not done yet'}</strong>
                            </>
                          )}
                        </Show>
                      </td>
                    );
                  }}
                </For>
              </tr>
            )}
          </For>
        </tbody>
      </table>
    </section>
  );
}
