import { createResource, createSignal, For, Show } from 'solid-js';
import { setupApi } from '../../api/setup-api.js';
import { go, href } from '../../ui/router.js';
import { Loading } from '../../ui/Loading.js';
import { ImportProject } from '../exchange/ImportProject.js';
import { MODE_TEXT, NewStudyForm } from './NewStudyForm.js';

export function Studies() {
  const [studies, { refetch }] = createResource(() => setupApi.allStudies());
  const active = () => studies()?.filter((s) => !s.archivedAt) ?? [];
  const archived = () => studies()?.filter((s) => s.archivedAt) ?? [];
  const [creating, setCreating] = createSignal(false);
  return (
    <main class="page">
      <h1>Your studies</h1>
      <Loading loading={studies.loading} error={studies.error} what="your studies">
        <Show
          when={active().length > 0}
          fallback={
            <div class="empty" data-testid="no-studies">
              <p><strong>You are not in any study yet.</strong></p>
              <p>Create one below: you become its owner, then upload transcripts and invite your team. If a colleague runs the study, ask its owner for an invitation link instead.</p>
            </div>
          }
        >
          <ul class="card-list" aria-label="Studies">
            <For each={active()}>
              {(s) => (
                <li class="card">
                  <a href={href({ name: 'study', studyId: s.id })}>{s.title}</a>
                  <span class="tag">{s.role}</span>
                  <span class="muted">{MODE_TEXT[s.mode]?.label ?? s.mode}</span>
                </li>
              )}
            </For>
          </ul>
        </Show>
        <section aria-labelledby="new-study-h" class="new-study">
          <h2 id="new-study-h">New study</h2>
          <Show when={creating() || active().length === 0} fallback={<button type="button" onClick={() => setCreating(true)}>Create a study…</button>}>
            <NewStudyForm onCreated={(id) => go({ name: 'settings', studyId: id })} />
          </Show>
        </section>
        <Show when={archived().length > 0}>
          <section aria-labelledby="archived-h">
            <h2 id="archived-h">Archived</h2>
            <ul class="card-list" aria-label="Archived studies">
              <For each={archived()}>{(s) => <li class="card"><a href={href({ name: 'settings', studyId: s.id })}>{s.title}</a><span class="tag">{s.role}</span></li>}</For>
            </ul>
          </section>
        </Show>
      </Loading>
      <ImportProject onImported={() => void refetch()} />
    </main>
  );
}
