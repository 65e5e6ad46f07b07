import { createSignal, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { createSubmit } from '../../ui/forms.js';
import { sessionStarted } from '../../ui/session.js';
import { go } from '../../ui/router.js';
import { DataNotice } from '../../ui/DataNotice.js';

/** First run: the server has no account yet; whoever holds the code from its terminal becomes the owner. */
export function FirstRun() {
  const [code, setCode] = createSignal('');
  const [name, setName] = createSignal('');
  const [email, setEmail] = createSignal('');
  const [password, setPassword] = createSignal('');
  const submit = createSubmit();
  const onSubmit = (e: Event) => {
    e.preventDefault();
    void submit.run(async () => {
      await setupApi.setup({ code: code(), name: name(), email: email(), password: password() });
      await sessionStarted();
      go({ name: 'studies' });
    });
  };
  return (
    <main class="signin">
      <h1>Set up Gloss</h1>
      <p class="lede">This server has no accounts yet. Create the owner account: you will then create studies and invite your team.</p>
      <p>
        Enter the <strong>set-up code</strong> printed in the terminal where the server was started (it looks like <code>ABCD-EFGH-JKMN</code>).
        It works once, so that nobody else on the network can claim this server first.
      </p>
      <form onSubmit={onSubmit} aria-label="Create the owner account">
        <label>Set-up code<input name="code" autocomplete="off" required value={code()} onInput={(e) => setCode(e.currentTarget.value)} /></label>
        <label>Your name<input name="name" autocomplete="name" required value={name()} onInput={(e) => setName(e.currentTarget.value)} /></label>
        <label>Email<input type="email" name="email" autocomplete="username" required value={email()} onInput={(e) => setEmail(e.currentTarget.value)} /></label>
        <label>
          Password (at least 8 characters)
          <input type="password" name="password" autocomplete="new-password" minLength={8} required value={password()} onInput={(e) => setPassword(e.currentTarget.value)} />
        </label>
        <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
        <button type="submit" disabled={submit.busy()}>{submit.busy() ? 'Creating…' : 'Create the owner account'}</button>
      </form>
      <DataNotice />
    </main>
  );
}
