import { createResource, createSignal, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { createSubmit, when } from '../../ui/forms.js';
import { me, sessionStarted, signOut } from '../../ui/session.js';
import { go } from '../../ui/router.js';
import { Loading } from '../../ui/Loading.js';
import { DataNotice } from '../../ui/DataNotice.js';

/** An invitation link: a new person sets their name and password; someone with an account enters its password. */
export function Invitation(props: { token: string }) {
  const [info] = createResource(() => props.token, (t) => setupApi.invitation(t));
  const [name, setName] = createSignal('');
  const [password, setPassword] = createSignal('');
  const submit = createSubmit();
  const onSubmit = (e: Event) => {
    e.preventDefault();
    void submit.run(async () => {
      // Joining as the invited person: whoever was signed in on this browser is signed out (and forgotten) first.
      if (me()) await signOut().catch(() => undefined);
      const joined = await setupApi.accept(props.token, { ...(info()?.accountExists ? {} : { name: name() }), password: password() });
      await sessionStarted();
      go({ name: 'study', studyId: joined.studyId });
    });
  };
  return (
    <main class="signin">
      <h1>Join a study</h1>
      <Loading loading={info.loading} error={info.error} what="the invitation">
        <Show when={info()}>
          {(i) => (
            <>
              <p class="lede">
                You are invited to <strong>{i().studyTitle}</strong> as <strong>{i().role}</strong>, with the email {i().email}. The link works once, until {when(i().expiresAt)}.
              </p>
              <form onSubmit={onSubmit} aria-label="Accept the invitation">
                <Show
                  when={!i().accountExists}
                  fallback={<p>An account with this email exists already: enter its password to join.</p>}
                >
                  <label>Your name, as others in the study will see it<input name="name" autocomplete="name" required value={name()} onInput={(e) => setName(e.currentTarget.value)} /></label>
                </Show>
                <label>
                  {i().accountExists ? 'Password' : 'Choose a password (at least 8 characters)'}
                  <input type="password" name="password" autocomplete={i().accountExists ? 'current-password' : 'new-password'} minLength={i().accountExists ? undefined : 8} required value={password()} onInput={(e) => setPassword(e.currentTarget.value)} />
                </label>
                <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
                <button type="submit" disabled={submit.busy()}>{submit.busy() ? 'Joining…' : 'Join the study'}</button>
              </form>
            </>
          )}
        </Show>
      </Loading>
      <DataNotice />
    </main>
  );
}
