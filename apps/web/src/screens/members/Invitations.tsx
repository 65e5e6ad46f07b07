import { createResource, createSignal, For, Show } from 'solid-js';
import { setupApi, type Link } from '../../api/setup-api.js';
import { ROLES, type Role } from '../../api/types.js';
import { createSubmit, when } from '../../ui/forms.js';
import { CopyLink } from '../../ui/CopyLink.js';

/** Invite by email with a role: Gloss makes a single-use link that the inviter copies and sends. */
export function Invitations(props: { studyId: string; myRole: Role | undefined }) {
  const [pending, { refetch }] = createResource(() => props.studyId, (id) => setupApi.invitations(id));
  const [email, setEmail] = createSignal('');
  const [role, setRole] = createSignal<Role>('coder');
  const [made, setMade] = createSignal<Link & { email: string }>();
  const submit = createSubmit();
  const roles = () => ROLES.filter((r) => r !== 'owner' || props.myRole === 'owner');
  const invite = (e: Event) => {
    e.preventDefault();
    setMade(undefined);
    void submit.run(async () => {
      setMade(await setupApi.invite(props.studyId, email(), role()));
      setEmail('');
      await refetch();
    });
  };
  return (
    <section aria-labelledby="invite-h">
      <h3 id="invite-h">Invite someone</h3>
      <form class="inline-form" aria-label="Invite by email" onSubmit={invite}>
        <label>Email<input type="email" required value={email()} onInput={(e) => setEmail(e.currentTarget.value)} /></label>
        <label>Role
          <select value={role()} onChange={(e) => setRole(e.currentTarget.value as Role)}>
            <For each={roles()}>{(r) => <option value={r}>{r}</option>}</For>
          </select>
        </label>
        <button type="submit" disabled={submit.busy()}>Make invitation link</button>
      </form>
      <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
      <Show when={made()}>{(m) => <CopyLink path={m().path} expiresAt={m().expiresAt} label={`Invitation link for ${m().email}`} />}</Show>
      <Show when={(pending() ?? []).length > 0}>
        <table class="invitations" aria-label="Invitations not yet used">
          <thead><tr><th scope="col">Email</th><th scope="col">Role</th><th scope="col">Valid until</th><th scope="col"><span class="sr-only">Actions</span></th></tr></thead>
          <tbody>
            <For each={pending()}>
              {(i) => (
                <tr>
                  <td>{i.email}</td>
                  <td>{i.role}</td>
                  <td>{i.expired ? <span class="error">expired {when(i.expiresAt)}</span> : when(i.expiresAt)}</td>
                  <td><button type="button" class="quiet" onClick={() => void submit.run(async () => { await setupApi.withdraw(props.studyId, i.id); await refetch(); })}>Withdraw</button></td>
                </tr>
              )}
            </For>
          </tbody>
        </table>
      </Show>
    </section>
  );
}
