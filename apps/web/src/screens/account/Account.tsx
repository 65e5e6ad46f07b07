import { createSignal, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { createSubmit } from '../../ui/forms.js';
import { href } from '../../ui/router.js';
import { me } from '../../ui/session.js';

/** One's own account: change the password (which ends this account's other sessions). */
export function Account() {
  const [current, setCurrent] = createSignal('');
  const [next, setNext] = createSignal('');
  const [done, setDone] = createSignal(false);
  const submit = createSubmit();
  const onSubmit = (e: Event) => {
    e.preventDefault();
    setDone(false);
    void submit.run(async () => {
      await setupApi.changePassword(current(), next());
      setCurrent('');
      setNext('');
      setDone(true);
    });
  };
  return (
    <main class="page narrow">
      <p class="crumbs"><a href={href({ name: 'studies' })}>Studies</a> /</p>
      <h1>Your account</h1>
      <p>{me()?.name} · {me()?.email}</p>
      <h2>Change your password</h2>
      <p class="muted">Changing it signs you out on every other browser and device; this one stays signed in.</p>
      <form onSubmit={onSubmit} aria-label="Change your password" class="stacked">
        <label>Current password<input type="password" autocomplete="current-password" required value={current()} onInput={(e) => setCurrent(e.currentTarget.value)} /></label>
        <label>New password (at least 8 characters)<input type="password" autocomplete="new-password" minLength={8} required value={next()} onInput={(e) => setNext(e.currentTarget.value)} /></label>
        <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
        <Show when={done()}><p role="status">Password changed. Your other sessions have ended.</p></Show>
        <button type="submit" disabled={submit.busy()}>Change password</button>
      </form>
    </main>
  );
}
