/**
 * The lead's view of the independent phase: per participant and text, words coded, segments and
 * "done". Progress only: which codes, and where, stay with each coder until the reveal.
 */
import { For, Show } from 'solid-js';
import type { Round } from '../../api/rounds.js';

export function ProgressBoard(props: { round: Round; texts: Array<{ id: string; title: string }>; nameOf: (userId: string) => string }) {
  const cell = (participantId: string, textId: string) => props.round.progress.find((p) => p.participantId === participantId && p.textId === textId);
  const texts = () => props.round.textIds.map((id) => props.texts.find((t) => t.id === id) ?? { id, title: 'a text' });
  const doneCount = () => props.round.progress.filter((p) => p.done).length;
  return (
    <section aria-labelledby="progress-h" data-testid="progress-board">
      <h2 id="progress-h">Progress</h2>
      <p class="muted">
        {doneCount()} of {props.round.participantIds.length * props.round.textIds.length} texts marked done. Only progress is shown here:
        nobody, the lead included, sees anyone's codes before the reveal.
      </p>
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
                <th scope="row">{props.nameOf(pid)}</th>
                <For each={texts()}>
                  {(t) => {
                    const c = () => cell(pid, t.id);
                    return (
                      <td data-participant={pid} data-text={t.id} data-done={c()?.done ? 'yes' : 'no'}>
                        <Show when={c()} fallback={<span class="muted">not opened</span>}>
                          {(x) => (
                            <>
                              <span>
                                {x().wordsCoded ?? 0}{x().words ? ` of ${x().words}` : ''} words coded, {x().segments} segment{x().segments === 1 ? '' : 's'}
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
