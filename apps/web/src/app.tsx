/** Top level: session gate, the study scope shared by a study's screens, and the route switch. */
import { Match, Show, Switch, createMemo, createResource, onMount } from 'solid-js';
import { loadSession, me, signOut } from './ui/session.js';
import { go, href, lastWhile, route } from './ui/router.js';
import { StatusBar } from './ui/StatusBar.js';
import { SignIn } from './screens/signin/SignIn.js';
import { Studies } from './screens/studies/Studies.js';
import { StudyScreen } from './screens/study/StudyScreen.js';
import { Members } from './screens/members/Members.js';
import { CodingScreen } from './screens/coding/CodingScreen.js';
import { SupervisionScreen } from './screens/supervision/SupervisionScreen.js';
import { CodebookScreen } from './screens/codebook/CodebookScreen.js';
import { MemosScreen } from './screens/memos/MemosScreen.js';
import { ReviewScreen } from './screens/review/ReviewScreen.js';
import { AnalysisScreen } from './screens/analysis/AnalysisScreen.js';
import { FirstRun } from './screens/first-run/FirstRun.js';
import { Invitation } from './screens/links/Invitation.js';
import { PasswordReset } from './screens/links/PasswordReset.js';
import { Account } from './screens/account/Account.js';
import { StudySettings } from './screens/settings/StudySettings.js';
import { Upload } from './screens/upload/Upload.js';
import { CasesScreen } from './screens/cases/CasesScreen.js';
import { VersionsScreen } from './screens/versions/VersionsScreen.js';
import { AuditScreen } from './screens/audit/AuditScreen.js';
import { DeidScreen } from './screens/deid/DeidScreen.js';
import { useStudy } from './screens/study/study-context.js';
import { StudyAgreementScreen } from './screens/agreement/AgreementScreen.js';
import { RoundsScreen } from './screens/rounds/RoundsScreen.js';
import { RoundScreen } from './screens/rounds/RoundScreen.js';
import { RoundText } from './screens/rounds/RoundText.js';
import { RoundAgreement } from './screens/rounds/RoundAgreement.js';
import { RoundReport } from './screens/rounds/RoundReport.js';
import { setupApi } from './api/setup-api.js';
import { unsentChanges } from './sync/forget.js';
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
      <Match when={route().name === 'supervision'}><SupervisionScreen studyId={props.studyId} scope={scope} me={props.me} /></Match>
      <Match when={route().name === 'settings'}><StudySettings studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'upload'}><Upload studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'cases'}><CasesScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'versions'}><VersionsScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'audit'}><AuditScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'deid'}><DeidScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={(() => { const r = route(); return r.name === 'coding' ? r.textId : undefined; })()}>
        {(textId) => { const id = lastWhile('coding', textId(), (r) => r.textId); return <CodingScreen studyId={props.studyId} textId={id()} scope={scope} me={props.me} segmentId={(() => { const r = route(); return r.name === 'coding' ? r.segmentId : undefined; })()} memoId={(() => { const r = route(); return r.name === 'coding' ? r.memoId : undefined; })()} />; }}
      </Match>
      <Match when={route().name === 'agreement'}><StudyAgreementScreen studyId={props.studyId} scope={scope} /></Match>
      <Match when={route().name === 'rounds'}><RoundsScreen studyId={props.studyId} scope={scope} me={props.me} /></Match>
      <Match when={(() => { const r = route(); return r.name === 'round' ? r.roundId : undefined; })()}>
        {(roundId) => <RoundScreen studyId={props.studyId} roundId={roundId()} scope={scope} me={props.me} />}
      </Match>
      <Match when={(() => { const r = route(); return r.name === 'round-text' ? r : undefined; })()}>
        {(first) => { const r = lastWhile('round-text', first(), (x) => x); return <RoundText studyId={props.studyId} roundId={r().roundId} textId={r().textId} at={r().at} scope={scope} me={props.me} />; }}
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

/** Signed out: the first run (no account on the server yet) or the sign-in form. */
function SignedOut() {
  const [needed] = createResource(() => setupApi.setupNeeded().catch(() => false));
  return (
    <Show when={!needed.loading} fallback={<p class="progress">Checking the server…</p>}>
      <Show when={needed()} fallback={<SignIn />}><FirstRun /></Show>
    </Show>
  );
}

async function signOutHere(): Promise<void> {
  const unsent = unsentChanges();
  if (unsent > 0 && !confirm(`${unsent} change(s) made offline have not reached the server yet. Signing out deletes them from this device. Sign out anyway?`)) return;
  await signOut().catch((err: unknown) => console.warn('sign-out: the server could not be told; this device was cleared', err));
  go({ name: 'signin' });
}

export function App() {
  onMount(() => void loadSession());
  const studyId = createMemo(() => {
    const r = route();
    return 'studyId' in r ? r.studyId : undefined;
  });
  const link = createMemo(() => {
    const r = route();
    return r.name === 'invite' || r.name === 'reset' ? r : undefined;
  });
  return (
    <div class="app">
      <a class="skip" href="#content">Skip to content</a>
      <header class="top-bar">
        <a class="brand" href={href({ name: 'studies' })}>Gloss</a>
        <Show when={me()}>
          {(u) => (
            <span class="who">
              <a href={href({ name: 'account' })} aria-label={`${u().name}, your account`}>{u().name}</a>{' '}
              <button type="button" class="link" onClick={() => void signOutHere()}>Sign out</button>
            </span>
          )}
        </Show>
      </header>
      <div id="content" class="content">
        <Switch
          fallback={
            <Show when={me() !== undefined} fallback={<p class="progress">Checking your session…</p>}>
              <Show when={me()} fallback={<SignedOut />}>
                {(u) => (
                  <Show when={route().name !== 'account'} fallback={<Account />}>
                    <Show when={studyId()} keyed fallback={<Studies />}>
                      {(id) => <StudyArea studyId={id} me={u()} />}
                    </Show>
                  </Show>
                )}
              </Show>
            </Show>
          }
        >
          <Match when={link()?.name === 'invite' && link()}>{(r) => <Invitation token={(r() as { token: string }).token} />}</Match>
          <Match when={link()?.name === 'reset' && link()}>{(r) => <PasswordReset token={(r() as { token: string }).token} />}</Match>
        </Switch>
      </div>
      <StatusBar />
    </div>
  );
}
