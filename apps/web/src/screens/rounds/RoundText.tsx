/**
 * A text of a round. While the round is in its independent phase: the coding view on the round's own
 * layer (the server serves nobody else's), with the participant's "done" mark. Once revealed: the
 * walk-through with follow mode and adjudication.
 */
import { Match, Show, Switch, createSignal, onCleanup, onMount } from 'solid-js';
import type { Me } from '../../api/types.js';
import { roundsApi, type Round } from '../../api/rounds.js';
import { errorMessage } from '../../api/errors.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { CodingScreen } from '../coding/CodingScreen.js';
import { Loading } from '../../ui/Loading.js';
import { href } from '../../ui/router.js';
import { WalkThrough } from './WalkThrough.js';
import { useMembers, useRound } from './round-data.js';
import { trackReading } from './reading.js';

export function RoundText(props: { studyId: string; roundId: string; textId: string; at?: number; scope: StudyScope; me: Me }) {
  const { round, error, loading, refetch } = useRound(() => props.roundId, 5000);
  const members = useMembers(() => props.studyId);
  // the phase decides the screen; polling must not remount it on every answer
  const phase = () => round()?.phase;
  return (
    <Switch fallback={
      <main class="page">
        <StudyNav studyId={props.studyId} scope={props.scope} current="rounds" />
        <Loading loading={loading() || members.loading} error={error() ?? members.error} what="the round">{null}</Loading>
      </main>
    }>
      <Match when={phase() === 'independent' && round()}>
        <CodingScreen
          studyId={props.studyId}
          textId={props.textId}
          scope={props.scope}
          me={props.me}
          layers={(l) => l.round === props.roundId}
          banner={<DoneBanner round={round()!} textId={props.textId} me={props.me} studyId={props.studyId} onChange={refetch} />}
        />
      </Match>
      <Match when={(phase() === 'revealed' || phase() === 'closed') && members() && round()}>
        <main class="page coding-page">
          <StudyNav studyId={props.studyId} scope={props.scope} current="rounds" />
          <p class="crumbs"><a href={href({ name: 'round', studyId: props.studyId, roundId: props.roundId })}>{round()!.name}</a> — walk-through</p>
          <Show when={props.textId} keyed>
            {(textId) => <WalkThrough studyId={props.studyId} round={round()!} textId={textId} at={props.at} scope={props.scope} me={props.me} members={members()!} />}
          </Show>
        </main>
      </Match>
    </Switch>
  );
}

/** Above the coding view during the independent phase: whose coding this is, and the "done" mark. */
function DoneBanner(props: { round: Round; textId: string; me: Me; studyId: string; onChange: () => void }) {
  const [error, setError] = createSignal('');
  const [busy, setBusy] = createSignal(false);
  const participant = () => props.round.me.participant;
  const done = () => props.round.me.done.includes(props.textId);
  let el!: HTMLDivElement;
  // A participant's reading counts on the lead's progress board ("words read"); a failed report is retried by the next one.
  onMount(() => {
    if (!participant()) return;
    const stop = trackReading(el.closest('main') ?? document.body, (words) => {
      roundsApi.reportRead(props.round.id, props.textId, words).catch((err: unknown) => console.warn('reading not reported', err));
    });
    onCleanup(stop);
  });
  const mark = async (on: boolean) => {
    setBusy(true);
    setError('');
    try {
      await roundsApi.markDone(props.round.id, props.textId, on);
      props.onChange();
    } catch (err) {
      setError(`Not saved: ${errorMessage(err)}`);
    } finally {
      setBusy(false);
    }
  };
  return (
    <div class="round-banner" data-testid="round-banner" ref={el}>
      <p>
        <strong>{props.round.name}</strong> — independent coding. You see only your own coding on this text until the lead reveals the round.{' '}
        <a href={href({ name: 'round', studyId: props.studyId, roundId: props.round.id })}>Back to the round</a>
      </p>
      <Show when={participant()}>
        <Show
          when={done()}
          fallback={<button type="button" disabled={busy()} onClick={() => void mark(true)}>Mark this text done</button>}
        >
          <p data-testid="done-state">You marked this text done. <button type="button" class="quiet" disabled={busy()} onClick={() => void mark(false)}>Not done after all</button></p>
        </Show>
      </Show>
      <Show when={error()}><p class="error" role="alert">{error()}</p></Show>
    </div>
  );
}
