/** The codebook: tree, themes and exclusive sets on the left; the chosen entry and second-cycle actions on the right. */
import { For, Show, createEffect, createMemo, createResource, createSignal, onCleanup } from 'solid-js';
import { addCode, assignMarks, addExclusiveSet, addTheme, codeTree, getCodes, listChanges, listExclusiveSets, listThemes, PROPOSALS_ROOT } from '@gloss/model';
import { codesInView, marksOverflowWords } from '../../doc/code-marks.js';
import type { Me } from '../../api/types.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { useY } from '../../ui/use-ydoc.js';
import { go, route } from '../../ui/router.js';
import { api } from '../../api/client.js';
import { errorMessage } from '../../api/errors.js';
import { CodeTree, GroupList } from './CodeTree.js';
import { EntryEditor } from './EntryEditor.js';
import { SecondCycle } from './SecondCycle.js';
import { Proposals } from './Proposals.js';
import { codebookLooked, useSeenCodes } from '../../ui/seen-codes.js';
import { changeWords } from './field-words.js';
import { personName } from '../../ui/person-name.js';
import type { OpenDoc } from '../../sync/open-doc.js';

export function CodebookScreen(props: { studyId: string; scope: StudyScope; me: Me }) {
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="codebook" />
      <Show when={props.scope.codebook()} keyed fallback={<p class="progress">Opening the codebook…</p>}>
        {(cb) => <Codebook cb={cb} {...props} />}
      </Show>
    </main>
  );
}

function Codebook(props: { cb: OpenDoc; studyId: string; scope: StudyScope; me: Me }) {
  const doc = props.cb.doc;
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const nameOf = (id: string) => personName(members(), id);
  const codes = useY(doc.getMap('codes'), () => getCodes(doc));
  const tree = createMemo(() => (codes(), codeTree(doc)));
  // the same colour-and-line per code as the coding view (proposals count: they show there too)
  const proposalsV = useY(doc.getMap(PROPOSALS_ROOT), () => ({}));
  const marks = createMemo(() => (codes(), proposalsV(), assignMarks(codesInView(doc))));
  const groups = useY(doc.getMap('exclusiveSets'), () => listExclusiveSets(doc));
  const themes = useY(doc.getMap('themes'), () => listThemes(doc));
  const history = useY(doc.getArray('changes'), () => listChanges(doc));
  const byId = createMemo(() => new Map(codes().map((c) => [c.id, c])));
  const chosenId = () => {
    const r = route();
    return r.name === 'codebook' ? r.codeId : undefined;
  };
  const chosen = createMemo(() => (chosenId() ? byId().get(chosenId()!) : undefined));
  const choose = (id: string) => go({ name: 'codebook', studyId: props.studyId, codeId: id });
  const role = () => props.scope.study()?.role;
  const canEdit = () => role() === 'owner' || role() === 'lead';
  const [label, setLabel] = createSignal('');
  const [message, setMessage] = createSignal('');
  // opening a code's entry clears its "updated" mark; the list below shows what changed since the last visit
  const seen = useSeenCodes(props.studyId, props.me.id);
  createEffect(() => {
    const id = chosenId();
    if (id) seen.markSeen(id);
  });
  const looked = codebookLooked(props.studyId, props.me.id);
  onCleanup(() => looked.now());
  // on a first look "since" has no start: the whole history (the seeded codebook included) would bury the
  // one thing a coder needs, so only definition edits by others are listed then
  const sinceLast = createMemo(() => history().filter((h) => h.at > looked.at && h.by !== props.me.id && h.codeIds.length > 0 && (looked.at > 0 || (h.kind === 'edit' && h.before !== undefined))));
  const SHOWN = 20;

  return (
    <div class="codebook">
      <nav class="codebook-nav" aria-label="Codebook">
        <Show when={canEdit()}>
          <form class="inline-form" aria-label="Add a code" onSubmit={(e) => {
            e.preventDefault();
            try {
              const id = addCode(doc, { label: label() }, { by: props.me.id });
              setLabel('');
              choose(id);
            } catch (err) {
              setMessage(errorMessage(err));
            }
          }}>
            <label>New code <input value={label()} onInput={(e) => setLabel(e.currentTarget.value)} /></label>
            <button type="submit">Add</button>
          </form>
          <Show when={message()}><p class="error" role="alert">{message()}</p></Show>
        </Show>
        <section aria-labelledby="since-h" data-testid="changed-since">
          <h3 id="since-h">{looked.at ? 'Changed since you last looked' : 'Definitions edited by others'} ({sinceLast().length})</h3>
          <Show when={sinceLast().length > 0} fallback={<p class="muted">Nothing new.</p>}>
            <ul class="since">
              <For each={[...sinceLast()].reverse().slice(0, SHOWN)}>
                {(h) => (
                  <li>
                    <button type="button" class="link" onClick={() => choose(h.codeIds[0]!)}>{byId().get(h.codeIds[0]!)?.label ?? 'a code'}</button>
                    {' '}<span class="muted">{changeWords(h)} by {nameOf(h.by)}, {new Date(h.at).toLocaleString()}</span>
                  </li>
                )}
              </For>
            </ul>
            <Show when={sinceLast().length > SHOWN}><p class="muted">and {sinceLast().length - SHOWN} earlier; each code's history has them all.</p></Show>
          </Show>
        </section>
        <Show when={marks().overflow}>
          <p class="warn" data-testid="marks-overflow">{marksOverflowWords(codesInView(doc).length, marks().pairs)}</p>
        </Show>
        <CodeTree nodes={tree()} marks={marks().marks} chosen={chosenId()} onChoose={choose} />
        <Proposals codebook={doc} codes={codes()} canDecide={canEdit()} by={props.me.id} nameOf={nameOf} />
        <GroupList title="Themes" groups={themes()} codes={byId()} onChoose={choose} testid="themes" />
        <GroupList title="Mutually exclusive sets" groups={groups()} codes={byId()} onChoose={choose} testid="exclusive-sets" />
        <Show when={canEdit()}>
          <GroupForm codes={codes().filter((c) => c.status === 'active')} onCreate={(kind, label, ids) => {
            try {
              (kind === 'theme' ? addTheme : addExclusiveSet)(doc, label, ids, { by: props.me.id });
              setMessage('');
            } catch (err) {
              setMessage(errorMessage(err));
            }
          }} />
        </Show>
      </nav>
      <div class="codebook-entry">
        {/* keyed on the id only: edits to the entry must not remount the fields being typed in */}
        <Show when={chosen() ? chosenId() : undefined} keyed fallback={<p class="muted">Choose a code to read or edit its entry.</p>}>
          {(id) => {
            const c = () => byId().get(id)!;
            return (
            <>
              <EntryEditor
                codebook={doc}
                awareness={props.cb.provider.awareness}
                code={c()}
                codes={byId()}
                history={history().filter((h) => h.codeIds.includes(id))}
                nameOf={nameOf}
                canEdit={canEdit()}
                by={props.me.id}
              />
              <Show when={canEdit()}>
                <SecondCycle studyId={props.studyId} codebook={doc} code={c()} codes={codes()} by={props.me.id} />
              </Show>
            </>
            );
          }}
        </Show>
      </div>
    </div>
  );
}

/** Groups codes into a theme or a mutually exclusive set. */
function GroupForm(props: { codes: Array<{ id: string; label: string }>; onCreate: (kind: 'theme' | 'exclusive', label: string, ids: string[]) => void }) {
  const [kind, setKind] = createSignal<'theme' | 'exclusive'>('exclusive');
  const [label, setLabel] = createSignal('');
  const [ids, setIds] = createSignal<string[]>([]);
  return (
    <details class="group-form">
      <summary>Group codes</summary>
      <form aria-label="Group codes" onSubmit={(e) => { e.preventDefault(); props.onCreate(kind(), label(), ids()); setLabel(''); setIds([]); }}>
        <label>Kind
          <select value={kind()} onChange={(e) => setKind(e.currentTarget.value as 'theme' | 'exclusive')}>
            <option value="exclusive">mutually exclusive set</option>
            <option value="theme">theme</option>
          </select>
        </label>
        <label>Name <input value={label()} onInput={(e) => setLabel(e.currentTarget.value)} required /></label>
        <fieldset>
          <legend>Codes</legend>
          <For each={props.codes}>
            {(c) => (
              <label class="check">
                <input type="checkbox" checked={ids().includes(c.id)} onChange={(e) => setIds(e.currentTarget.checked ? [...ids(), c.id] : ids().filter((x) => x !== c.id))} /> {c.label}
              </label>
            )}
          </For>
        </fieldset>
        <button type="submit" disabled={ids().length < 2}>Create group</button>
      </form>
    </details>
  );
}
