import { createResource, For, onCleanup, Show } from 'solid-js';
import { watchStudy } from '../../api/study-events.js';
import { api } from '../../api/client.js';
import { href } from '../../ui/router.js';
import { Loading } from '../../ui/Loading.js';
import { DataNotice } from '../../ui/DataNotice.js';
import type { StudyScope } from './study-context.js';
import { StudyNav, allowed } from './StudyNav.js';
import { PresenceList } from './PresenceList.js';
import { DeleteText } from './DeleteText.js';

export function StudyScreen(props: { studyId: string; scope: StudyScope }) {
  const [texts, { refetch: refetchTexts }] = createResource(() => props.studyId, (id) => api.texts(id));
  // texts uploaded or imported by someone else appear without a reload
  onCleanup(watchStudy(props.studyId, () => void refetchTexts()));
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  // progress per coder: segments per visible layer, counted from the server's resolution of each text
  const [progress] = createResource(texts, async (list) => {
    const out = new Map<string, Array<{ coderId: string; segments: number }>>();
    await Promise.all(list.map(async (t) => {
      const segs = await api.textSegments(t.id).catch(() => []);
      const by = new Map<string, number>();
      for (const s of segs) by.set(s.coderId, (by.get(s.coderId) ?? 0) + 1);
      out.set(t.id, [...by].map(([coderId, segments]) => ({ coderId, segments })));
    }));
    return out;
  });
  const canDelete = () => allowed(props.scope, 'text.delete');
  const nameOf = (id: string) => members()?.find((m) => m.userId === id)?.name ?? 'a coder';
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="study" />
      <div class="two-col">
        <section aria-labelledby="texts-h">
          <div class="section-head">
            <h2 id="texts-h">Texts</h2>
            <Show when={allowed(props.scope, 'text.import')}><a class="button" href={href({ name: 'upload', studyId: props.studyId })}>Upload texts</a></Show>
          </div>
          <Loading loading={texts.loading} error={texts.error} what="the texts">
            <table class="texts">
              <thead>
                <tr><th scope="col">Text</th><th scope="col">Coding so far (segments per coder)</th><th scope="col">Open now</th><Show when={canDelete()}><th scope="col"><span class="sr-only">Delete</span></th></Show></tr>
              </thead>
              <tbody>
                <For
                  each={texts()}
                  fallback={
                    <tr>
                      <td colSpan={3} data-testid="no-texts">
                        No texts yet.{' '}
                        {allowed(props.scope, 'text.import')
                          ? <>Upload interview transcripts (plain text, WebVTT, SRT or DOCX) with <a href={href({ name: 'upload', studyId: props.studyId })}>Upload texts</a>; then invite your coders under Members.</>
                          : 'An owner or lead of the study uploads the texts; they will appear here.'}
                      </td>
                    </tr>
                  }
                >
                  {(t) => (
                    <tr>
                      <td><a href={href({ name: 'coding', studyId: props.studyId, textId: t.id })}>{t.title}</a></td>
                      <td>
                        <Show when={progress()?.get(t.id)?.length} fallback={<span class="muted">{progress.loading ? 'counting…' : 'no segments yet'}</span>}>
                          <For each={progress()!.get(t.id)}>{(p) => <span class="tag">{nameOf(p.coderId)}: {p.segments}</span>}</For>
                        </Show>
                      </td>
                      <td>
                        <For each={props.scope.presence().filter((p) => p.textId === t.id)}>
                          {(p) => <span class="person" style={{ 'border-color': p.colour }}>{p.name}</span>}
                        </For>
                      </td>
                      <Show when={canDelete()}>
                        <td><DeleteText textId={t.id} title={t.title} onDeleted={() => void refetchTexts()} /></td>
                      </Show>
                    </tr>
                  )}
                </For>
              </tbody>
            </table>
          </Loading>
        </section>
        <aside aria-labelledby="here-h">
          <h2 id="here-h">Here now</h2>
          <PresenceList scope={props.scope} />
        </aside>
      </div>
      <DataNotice />
    </main>
  );
}
