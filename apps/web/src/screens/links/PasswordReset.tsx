import { createResource, createSignal, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { createSubmit, when } from '../../ui/forms.js';
import { href } from '../../ui/router.js';
import { Loading } from '../../ui/Loading.js';

/** A password-reset link an owner made: set a new password; every session of the account ends. */
export function PasswordReset(props: { token: string }) {
  const [info] = createResource(() => props.token, (t) => setupApi.resetInfo(t));
  const [password, setPassword] = createSignal('');
  const [done, setDone] = createSignal(false);
  const submit = createSubmit();
  const onSubmit = (e: Event) => {
    e.preventDefault();
    void submit.run(async () => {
      await setupApi.resetPassword(props.token, password());
      setDone(true);
    });
  };
  return (
    <main class="signin">
      <h1>Set a new password</h1>
      <Loading loading={info.loading} error={info.error} what="the reset link">
        <Show when={!done()} fallback={<p role="status">Your password is set and every earlier session of {info()?.email} has ended. <a href={href({ name: 'signin' })}>Sign in</a> with the new password.</p>}>
          <p class="lede">For {info()?.email}. The link works once, until {info() ? when(info()!.expiresAt) : ''}. Setting the password signs this account out everywhere.</p>
          <form onSubmit={onSubmit} aria-label="Set a new password">
            <label>
              New password (at least 8 characters)
              <input type="password" autocomplete="new-password" minLength={8} required value={password()} onInput={(e) => setPassword(e.currentTarget.value)} />
            </label>
            <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
            <button type="submit" disabled={submit.busy()}>Set the password</button>
          </form>
        </Show>
      </Loading>
    </main>
  );
}
