/** Top level: session gate, the study scope shared by a study's screens, and the route switch. */
import { Match, Show, Switch, createMemo, onMount } from 'solid-js';
import { loadSession, me, signOut } from './ui/session.js';
import { go, href, route } from './ui/router.js';
import { StatusBar } from './ui/StatusBar.js';
import { SignIn } from './screens/signin/SignIn.js';
import { Studies } from './screens/studies/Studies.js';
import { StudyScreen } from './screens/study/StudyScreen.js';
import { Members } from './screens/members/Members.js';
import { CodingScreen } from './screens/coding/CodingScreen.js';
import { CodebookScreen } from './screens/codebook/CodebookScreen.js';
import { MemosScreen } from './screens/memos/MemosScreen.js';
import { ReviewScreen } from './screens/review/ReviewScreen.js';
import { AnalysisScreen } from './screens/analysis/AnalysisScreen.js';
import { useStudy } from './screens/study/study-context.js';
import { StudyAgreementScreen } from './screens/agreement/AgreementScreen.js';
import { RoundsScreen } from './screens/rounds/RoundsScreen.js';
import { RoundScreen } from './screens/rounds/RoundScreen.js';
import { RoundText } from './screens/rounds/RoundText.js';
import { RoundAgreement } from './screens/rounds/RoundAgreement.js';
import { RoundReport } from './screens/rounds/RoundReport.js';
import type { Me } from './api/types.js';

function StudyArea(props: { studyId: string; me: Me }) {
  const scope = useStudy(() => props.studyId, () => props.me);
  return (
    <Switch>
      <Match when={route().name === 'study'}><StudyScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'members'}><Members studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'codebook'}><CodebookScreen studyId={props.studyId} scope={scope} me={props.me} /></Match>
      <Match when={route().name === 'analysis'}><AnalysisScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'memos'}><MemosScreen studyId={props.studyId} scope={scope} me={props.me} /></Match>
      <Match when={route().name === 'review'}><ReviewScreen studyId={props.studyId} scope={scope} me={props.me} /></Match>
      <Match when={(() => { const r = route(); return r.name === 'coding' ? r.textId : undefined; })()}>
        {(textId) => <CodingScreen studyId={props.studyId} textId={textId()} scope={scope} me={props.me} />}
      </Match>
      <Match when={route().name === 'agreement'}><StudyAgreementScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'rounds'}><RoundsScreen studyId={props.studyId} scope={scope} me={props.me} /></Match>
      <Match when={(() => { const r = route(); return r.name === 'round' ? r.roundId : undefined; })()}>
        {(roundId) => <RoundScreen studyId={props.studyId} roundId={roundId()} scope={scope} me={props.me} />}
      </Match>
      <Match when={(() => { const r = route(); return r.name === 'round-text' ? r : undefined; })()}>
        {(r) => <RoundText studyId={props.studyId} roundId={r().roundId} textId={r().textId} at={r().at} scope={scope} me={props.me} />}
      </Match>
      <Match when={(() => { const r = route(); return r.name === 'round-agreement' ? r.roundId : undefined; })()}>
        {(roundId) => <RoundAgreement studyId={props.studyId} roundId={roundId()} scope={scope} />}
      </Match>
      <Match when={(() => { const r = route(); return r.name === 'round-report' ? r.roundId : undefined; })()}>
        {(roundId) => <RoundReport studyId={props.studyId} roundId={roundId()} scope={scope} />}
      </Match>
    </Switch>
  );
}

export function App() {
  onMount(() => void loadSession());
  const studyId = createMemo(() => {
    const r = route();
    return 'studyId' in r ? r.studyId : undefined;
  });
  return (
    <div class="app">
      <a class="skip" href="#content">Skip to content</a>
      <header class="top-bar">
        <a class="brand" href={href({ name: 'studies' })}>Gloss</a>
        <Show when={me()}>
          {(u) => (
            <span class="who">
              {u().name}{' '}
              <button type="button" class="link" onClick={() => void signOut().then(() => go({ name: 'signin' }))}>Sign out</button>
            </span>
          )}
        </Show>
      </header>
      <div id="content" class="content">
        <Show when={me() !== undefined} fallback={<p class="progress">Checking your session…</p>}>
          <Show when={me()} fallback={<SignIn />}>
            {(u) => (
              <Show when={studyId()} keyed fallback={<Studies />}>
                {(id) => <StudyArea studyId={id} me={u()} />}
              </Show>
            )}
          </Show>
        </Show>
      </div>
      <StatusBar />
    </div>
  );
}
