import { createSignal, Show } from 'solid-js';
import { signIn } from '../../ui/session.js';
import { errorMessage } from '../../api/errors.js';
import { go } from '../../ui/router.js';
import { DataNotice } from '../../ui/DataNotice.js';

export function SignIn() {
  const [email, setEmail] = createSignal('');
  const [password, setPassword] = createSignal('');
  const [error, setError] = createSignal('');
  const [busy, setBusy] = createSignal(false);
  const submit = async (e: Event) => {
    e.preventDefault();
    setBusy(true);
    setError('');
    try {
      await signIn(email(), password());
      go({ name: 'studies' });
    } catch (err) {
      setError(errorMessage(err));
    } finally {
      setBusy(false);
    }
  };
  return (
    <main class="signin">
      <h1>Gloss</h1>
      <p class="lede">Code interview transcripts together.</p>
      <form onSubmit={submit} aria-label="Sign in">
        <label>
          Email
          <input type="email" name="email" autocomplete="username" required value={email()} onInput={(e) => setEmail(e.currentTarget.value)} />
        </label>
        <label>
          Password
          <input type="password" name="password" autocomplete="current-password" required value={password()} onInput={(e) => setPassword(e.currentTarget.value)} />
        </label>
        <Show when={error()}>
          <p class="error" role="alert">{error()}</p>
        </Show>
        <button type="submit" disabled={busy()}>{busy() ? 'Signing in…' : 'Sign in'}</button>
      </form>
      <p class="muted" data-testid="offline-copy-note">
        Working offline keeps a copy of the texts, codebook and memos you open on this device (in the browser’s storage).
        Signing out deletes that copy. On a shared or public computer, sign out when you are done.
      </p>
      <DataNotice />
    </main>
  );
}
