/**
 * One round. Its set-up (texts, participants, unit, statistic, purpose, codebook version) and phase;
 * during the independent phase the lead's progress board and each participant's texts with their
 * "done" marks; the reveal and the close (lead and owner); after the reveal, the walk-through of each
 * text, the agreement and the report.
 */
import { For, Show, createSignal } from 'solid-js';
import type { Me } from '../../api/types.js';
import { roundsApi, type Round } from '../../api/rounds.js';
import { errorMessage } from '../../api/errors.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { Loading } from '../../ui/Loading.js';
import { href } from '../../ui/router.js';
import { ProgressBoard } from './ProgressBoard.js';
import { PHASE_WORDS, leadsRound, useRound } from './round-data.js';
import { statisticName, unitName } from '../agreement/AgreementScreen.js';

export function RoundScreen(props: { studyId: string; roundId: string; scope: StudyScope; me: Me }) {
  const { round, error, loading, refetch } = useRound(() => props.roundId, 5000);
  const title = (id: string) => round()?.texts.find((t) => t.id === id)?.title || 'a text';
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="rounds" />
      <p class="crumbs"><a href={href({ name: 'rounds', studyId: props.studyId })}>Rounds</a> /</p>
      <Show when={round()} fallback={<Loading loading={loading()} error={error()} what="the round">{null}</Loading>}>
        {(r) => (
          <>
            <Show when={error()}><p class="error" role="alert">The round could not be brought up to date: {errorMessage(error())}</p></Show>
            <h2 data-testid="round-name">{r().name}</h2>
            <p><span class="phase" data-phase={r().phase} data-testid="round-phase">{PHASE_WORDS[r().phase]}</span></p>
            <Show when={r().purpose}><p class="purpose">{r().purpose}</p></Show>
            <dl class="facts">
              <dt>Unit of comparison</dt><dd>{unitName(r().unit)}</dd>
              <Show when={props.scope.study()?.mode !== 'reflexive'}><dt>Statistic</dt><dd>{statisticName(r().statistic)}</dd></Show>
              <dt>Participants</dt><dd>{r().participants.map((p) => p.name).join(', ')}</dd>
              <Show when={r().leadName}><dt>Started by</dt><dd>{r().leadName}</dd></Show>
            </dl>
            <Show when={leadsRound(r())} fallback={<ParticipantView round={r()} studyId={props.studyId} title={title} />}>
              <LeadView round={r()} studyId={props.studyId} onChange={refetch} />
            </Show>
          </>
        )}
      </Show>
    </main>
  );
}

function TextLinks(props: { round: Round; studyId: string; title: (id: string) => string; label: string }) {
  return (
    <ul class="round-texts">
      <For each={props.round.textIds}>
        {(id) => <li><a href={href({ name: 'round-text', studyId: props.studyId, roundId: props.round.id, textId: id })}>{props.label} “{props.title(id)}”</a></li>}
      </For>
    </ul>
  );
}

function AfterReveal(props: { round: Round; studyId: string; title: (id: string) => string }) {
  return (
    <>
      <section aria-labelledby="walk-h">
        <h2 id="walk-h">Walk through the differences</h2>
        <TextLinks round={props.round} studyId={props.studyId} title={props.title} label="Walk through" />
      </section>
      <p class="row">
        <a href={href({ name: 'round-agreement', studyId: props.studyId, roundId: props.round.id })}>Agreement in this round</a>
        <a href={href({ name: 'round-report', studyId: props.studyId, roundId: props.round.id })}>Round report</a>
      </p>
    </>
  );
}

function LeadView(props: { round: Round; studyId: string; onChange: () => void }) {
  const [error, setError] = createSignal('');
  const [confirming, setConfirming] = createSignal<'reveal' | 'close' | null>(null);
  const title = (id: string) => props.round.texts.find((t) => t.id === id)?.title || 'a text';
  const act = async (what: 'reveal' | 'close') => {
    setError('');
    try {
      await (what === 'reveal' ? roundsApi.reveal(props.round.id) : roundsApi.close(props.round.id));
      setConfirming(null);
      props.onChange();
    } catch (err) {
      setError(`The round was not ${what === 'reveal' ? 'revealed' : 'closed'}: ${errorMessage(err)}`);
    }
  };
  return (
    <>
      <Show when={props.round.phase === 'independent'}>
        <ProgressBoard round={props.round} pollMs={4000} />
        <Show when={props.round.me.participant}>
          <section aria-labelledby="own-h">
            <h2 id="own-h">Texts of the round</h2>
            <TextLinks round={props.round} studyId={props.studyId} title={title} label="Open" />
          </section>
        </Show>
        <Show when={confirming() === 'reveal'} fallback={<button type="button" onClick={() => setConfirming('reveal')}>Reveal the round…</button>}>
          <div class="confirm" role="group" aria-label="Confirm the reveal">
            <p>Revealing lets every participant see everyone's round coding. Coding after this point is no longer independent.</p>
            <button type="button" onClick={() => void act('reveal')}>Reveal now</button>{' '}
            <button type="button" class="quiet" onClick={() => setConfirming(null)}>Not yet</button>
          </div>
        </Show>
      </Show>
      <Show when={props.round.phase !== 'independent'}>
        <AfterReveal round={props.round} studyId={props.studyId} title={title} />
        <Show when={props.round.phase === 'revealed'}>
          <Show when={confirming() === 'close'} fallback={<button type="button" class="quiet" onClick={() => setConfirming('close')}>Close the round…</button>}>
            <div class="confirm" role="group" aria-label="Confirm closing the round">
              <p>Closing ends adjudication: the consensus layer and the figures become the round's final record.</p>
              <button type="button" onClick={() => void act('close')}>Close now</button>{' '}
              <button type="button" class="quiet" onClick={() => setConfirming(null)}>Not yet</button>
            </div>
          </Show>
        </Show>
      </Show>
      <Show when={error()}><p class="error" role="alert">{error()}</p></Show>
    </>
  );
}

function ParticipantView(props: { round: Round; studyId: string; title: (id: string) => string }) {
  const mine = () => props.round.me.participant;
  const done = (textId: string) => props.round.me.done.includes(textId);
  return (
    <Show when={props.round.phase === 'independent'} fallback={<AfterReveal round={props.round} studyId={props.studyId} title={props.title} />}>
      <Show when={mine()} fallback={<p>This round is being coded independently. Its coding is shown after the reveal.</p>}>
        <section aria-labelledby="yours-h">
          <h2 id="yours-h">Your texts in this round</h2>
          <p class="muted">Code each text on your own: nobody sees your coding, and you see nobody's, until the lead reveals the round.</p>
          <ul class="round-texts">
            <For each={props.round.textIds}>
              {(id) => (
                <li>
                  <a href={href({ name: 'round-text', studyId: props.studyId, roundId: props.round.id, textId: id })}>Code “{props.title(id)}”</a>
                  {' '}<span class={done(id) ? 'done' : 'muted'}>{done(id) ? '✓ done' : 'not done yet'}</span>
                </li>
              )}
            </For>
          </ul>
        </section>
      </Show>
    </Show>
  );
}
