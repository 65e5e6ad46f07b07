import { createResource, createSignal, For, Show } from 'solid-js';
import { api } from '../../api/client.js';
import { errorMessage } from '../../api/errors.js';
import { ROLES, type Role } from '../../api/types.js';
import { me } from '../../ui/session.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { Loading } from '../../ui/Loading.js';
import { CopyLink } from '../../ui/CopyLink.js';
import { setupApi, type Link } from '../../api/setup-api.js';
import { Invitations } from './Invitations.js';

/** Members and roles; owners and leads invite, change and remove; owners make password-reset links. */
export function Members(props: { studyId: string; scope: StudyScope }) {
  const [members, { refetch }] = createResource(() => props.studyId, (id) => api.members(id));
  const [error, setError] = createSignal('');
  const [reset, setReset] = createSignal<Link & { email: string }>();
  const [invited, setInvited] = createSignal<{ path: string; expiresAt: string; email: string }>();
  const [email, setEmail] = createSignal('');
  const [role, setRole] = createSignal<Role>('coder');
  const myRole = () => members()?.find((m) => m.userId === me()?.id)?.role ?? props.scope.study()?.role;
  const canManage = () => myRole() === 'owner' || myRole() === 'lead';
  const act = async (f: () => Promise<void>) => {
    setError('');
    try {
      await f();
      await refetch();
    } catch (err) {
      setError(errorMessage(err));
    }
  };
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="members" />
      <h2>Members and roles</h2>
      <Show when={error()}><p class="error" role="alert">{error()}</p></Show>
      <Loading loading={members.loading} error={members.error} what="the members">
        <table class="members">
          <thead><tr><th scope="col">Name</th><th scope="col">Email</th><th scope="col">Role</th><Show when={canManage()}><th scope="col"><span class="sr-only">Actions</span></th></Show></tr></thead>
          <tbody>
            <For each={members()}>
              {(m) => (
                <tr>
                  <td>{m.name}</td>
                  <td>{m.email}</td>
                  <td>
                    <Show when={canManage() && m.userId !== me()?.id} fallback={m.role}>
                      <select aria-label={`Role of ${m.name}`} value={m.role} onChange={(e) => act(() => api.setRole(props.studyId, m.userId, e.currentTarget.value as Role))}>
                        <For each={ROLES}>{(r) => <option value={r}>{r}</option>}</For>
                      </select>
                    </Show>
                  </td>
                  <Show when={canManage()}>
                    <td>
                      <Show when={m.userId !== me()?.id}>
                        <button type="button" class="danger" onClick={() => confirm(`Remove ${m.name} from the study?`) && act(() => api.removeMember(props.studyId, m.userId))}>Remove</button>
                        <Show when={myRole() === 'owner'}>
                          {' '}<button type="button" class="quiet" onClick={() => void act(async () => void setReset(await setupApi.resetLink(props.studyId, m.userId)))}>Password reset link</button>
                        </Show>
                      </Show>
                    </td>
                  </Show>
                </tr>
              )}
            </For>
          </tbody>
        </table>
      </Loading>
      <Show when={invited()}>{(r) => <CopyLink path={r().path} expiresAt={r().expiresAt} label={`Link to join for ${r().email}`} />}</Show>
      <Show when={reset()}>{(r) => <CopyLink path={r().path} expiresAt={r().expiresAt} label={`Password-reset link for ${r().email}`} />}</Show>
      <Show when={canManage()}>
        <Invitations studyId={props.studyId} myRole={myRole()} />
        <details>
          <summary>Add by email (a member's role changes; anyone else gets a link to join)</summary>
          <form class="inline-form" aria-label="Add a member" onSubmit={(e) => { e.preventDefault(); const who = email(); void act(async () => { const link = await api.addMember(props.studyId, who, role()); setInvited(link ? { ...link, email: who } : undefined); }).then(() => setEmail('')); }}>
            <label>Email <input type="email" required value={email()} onInput={(e) => setEmail(e.currentTarget.value)} /></label>
            <label>Role
              <select value={role()} onChange={(e) => setRole(e.currentTarget.value as Role)}>
                <For each={ROLES}>{(r) => <option value={r}>{r}</option>}</For>
              </select>
            </label>
            <button type="submit">Add member</button>
          </form>
        </details>
      </Show>
      <p class="muted">Roles: owner and lead manage the study and the codebook; coders and trainees code their own layers; observers read.</p>
    </main>
  );
}
