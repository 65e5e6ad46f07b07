import { createEffect, createResource, createSignal, Show } from 'solid-js';
import { setupApi, type NewStudy } from '../../api/setup-api.js';
import { createSubmit, when } from '../../ui/forms.js';
import { href } from '../../ui/router.js';
import { Loading } from '../../ui/Loading.js';
import { DataNotice } from '../../ui/DataNotice.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { emptyStudy, StudyFields } from '../studies/NewStudyForm.js';
import { DeleteStudy } from './DeleteStudy.js';

/** A study's settings: the owner edits them and archives the study; everyone else reads them. */
export function StudySettings(props: { studyId: string; scope: StudyScope }) {
  const [study, { mutate }] = createResource(() => props.studyId, (id) => setupApi.studySettings(id));
  const [value, setValue] = createSignal<NewStudy>(emptyStudy());
  const [saved, setSaved] = createSignal(false);
  createEffect(() => {
    const s = study();
    if (s) setValue({ title: s.title, description: s.description, mode: s.mode, retentionUntil: s.retentionUntil, ethicsNote: s.ethicsNote });
  });
  const canEdit = () => study()?.permissions.includes('study.update') ?? false;
  const submit = createSubmit();
  const save = (e: Event) => {
    e.preventDefault();
    setSaved(false);
    void submit.run(async () => {
      mutate(await setupApi.updateStudy(props.studyId, value()));
      setSaved(true);
    });
  };
  const archive = (archived: boolean) => void submit.run(async () => void mutate(await setupApi.updateStudy(props.studyId, { archived })));
  return (
    <main class="page narrow">
      <StudyNav studyId={props.studyId} scope={props.scope} current="settings" />
      <h2>Study settings</h2>
      <Loading loading={study.loading} error={study.error} what="the settings">
        <Show when={study()?.archivedAt}>
          <p class="notice" role="status">Archived on {when(study()!.archivedAt!)}: the study is out of the working list; its data is kept.</p>
        </Show>
        <Show when={!canEdit()}><p class="muted">Only an owner changes these settings.</p></Show>
        <form onSubmit={save} aria-label="Study settings" class="stacked">
          <StudyFields value={value()} onChange={setValue} readOnly={!canEdit()} />
          <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
          <Show when={saved()}><p role="status">Saved.</p></Show>
          <Show when={canEdit()}><button type="submit" disabled={submit.busy()}>Save settings</button></Show>
        </form>
        <Show when={canEdit()}>
          <section aria-labelledby="archive-h">
            <h3 id="archive-h">Archive</h3>
            <Show
              when={study()?.archivedAt}
              fallback={<><p class="muted">Archiving moves the study out of everyone’s working list. Nothing is deleted; you can bring it back.</p><button type="button" class="quiet" onClick={() => archive(true)}>Archive this study</button></>}
            >
              <button type="button" class="quiet" onClick={() => archive(false)}>Bring the study back</button>
            </Show>
          </section>
        </Show>
        <Show when={study()?.permissions.includes('study.delete')}>
          <DeleteStudy studyId={props.studyId} title={study()!.title} />
        </Show>
        <p><a href={href({ name: 'study', studyId: props.studyId })}>Go to the texts</a> to upload transcripts next.</p>
      </Loading>
      <DataNotice />
    </main>
  );
}
