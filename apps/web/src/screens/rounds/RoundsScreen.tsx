/** The study's rounds, newest first, and (for the lead and owner) the set-up of a new round. */
import { For, Show, createResource } from 'solid-js';
import type { Me } from '../../api/types.js';
import { roundsApi } from '../../api/rounds.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { Loading } from '../../ui/Loading.js';
import { go, href } from '../../ui/router.js';
import { RoundSetup } from './RoundSetup.js';
import { PHASE_WORDS } from './round-data.js';

export function RoundsScreen(props: { studyId: string; scope: StudyScope; me: Me }) {
  const [rounds] = createResource(() => props.studyId, (id) => roundsApi.list(id));
  const canStart = () => ['owner', 'lead'].includes(props.scope.study()?.role ?? '');
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="rounds" />
      <div class="two-col wide-side">
        <section aria-labelledby="rounds-h">
          <h2 id="rounds-h">Calibration rounds</h2>
          <p class="muted">
            In a round, participants code the same texts independently; the lead then reveals the round, the team walks
            through the differences together, revises definitions and agrees a consensus. Only a round's independent
            coding yields figures fit to report.
          </p>
          <Loading loading={rounds.loading} error={rounds.error} what="the rounds">
            <table class="rounds">
              <thead><tr><th scope="col">Round</th><th scope="col">Phase</th><th scope="col">Texts</th><th scope="col">Participants</th></tr></thead>
              <tbody>
                <For each={rounds()} fallback={<tr><td colSpan={4}>No round yet.</td></tr>}>
                  {(r) => (
                    <tr>
                      <td><a href={href({ name: 'round', studyId: props.studyId, roundId: r.id })}>{r.name}</a></td>
                      <td>{PHASE_WORDS[r.phase]}</td>
                      <td>{r.textIds.length}</td>
                      <td>{r.participantIds.length}</td>
                    </tr>
                  )}
                </For>
              </tbody>
            </table>
          </Loading>
        </section>
        <Show when={canStart()}>
          <RoundSetup studyId={props.studyId} scope={props.scope} me={props.me} onStarted={(id) => go({ name: 'round', studyId: props.studyId, roundId: id })} />
        </Show>
      </div>
    </main>
  );
}
