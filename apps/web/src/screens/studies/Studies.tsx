import { createResource, For } from 'solid-js';
import { api } from '../../api/client.js';
import { href } from '../../ui/router.js';
import { Loading } from '../../ui/Loading.js';
import { ImportProject } from '../exchange/ImportProject.js';

export function Studies() {
  const [studies, { refetch }] = createResource(() => api.studies());
  return (
    <main class="page">
      <h1>Your studies</h1>
      <Loading loading={studies.loading} error={studies.error} what="your studies">
        <ul class="card-list" aria-label="Studies">
          <For each={studies()} fallback={<li>You are not a member of any study yet.</li>}>
            {(s) => (
              <li class="card">
                <a href={href({ name: 'study', studyId: s.id })}>{s.title}</a>
                {s.role ? <span class="tag">{s.role}</span> : null}
              </li>
            )}
          </For>
        </ul>
      </Loading>
      <ImportProject onImported={() => void refetch()} />
    </main>
  );
}
