import { createResource, createSignal, For, Show } from 'solid-js';
import { ATTRIBUTE_TYPES, addCase, defineAttribute, removeCase, setCaseValue, type AttributeDef, type AttributeType, type CaseView } from '@gloss/model';
import { api } from '../../api/client.js';
import { href } from '../../ui/router.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav, allowed } from '../study/StudyNav.js';
import { cellText, cellValue } from './cell-value.js';
import { useCases } from './use-cases.js';

const TYPE_TEXT: Record<AttributeType, string> = { text: 'text', number: 'number', date: 'date', boolean: 'yes / no', choice: 'choice from a list' };

/** Cases (participants, sites…) and their attributes, edited in a table; each value is checked against its attribute's type. */
export function CasesScreen(props: { studyId: string; scope: StudyScope }) {
  const state = useCases(props.scope);
  const [texts] = createResource(() => props.studyId, (id) => api.texts(id).catch(() => []));
  const canEdit = () => allowed(props.scope, 'codebook.write');
  const [error, setError] = createSignal('');
  const [bad, setBad] = createSignal<string>(''); // `${caseId}/${attrId}` of the refused cell
  const attempt = (f: () => void, cell = '') => {
    setError('');
    setBad('');
    try {
      f();
    } catch (err) {
      setError(err instanceof Error ? err.message : String(err));
      setBad(cell);
    }
  };

  const [attrName, setAttrName] = createSignal('');
  const [attrType, setAttrType] = createSignal<AttributeType>('text');
  const [choices, setChoices] = createSignal('');
  const [caseName, setCaseName] = createSignal('');
  const doc = () => state()?.doc;
  const titleOf = (id: string) => texts()?.find((t) => t.id === id)?.title ?? 'a text';

  const setCell = (c: CaseView, a: AttributeDef, raw: string) => attempt(() => setCaseValue(doc()!, c.id, a.id, cellValue(a, raw)), `${c.id}/${a.id}`);

  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="cases" />
      <h2>Cases and attributes</h2>
      <p class="muted">A case is a participant, site or group the texts belong to. Attributes (age band, site, role…) describe the cases; each has a type, and values that do not fit it are refused.</p>
      <Show when={!canEdit()}><p class="muted">Owners and leads edit cases; you can read them.</p></Show>
      <Show when={error()}><p class="error" role="alert">Not saved: {error()}</p></Show>
      <Show when={state()} fallback={<p class="progress">Opening the codebook document…</p>}>
        {(s) => (
          <>
            <Show
              when={s().cases.length > 0}
              fallback={<p class="empty" data-testid="no-cases">No cases yet. Add them here, or map speakers to cases when you <a href={href({ name: 'upload', studyId: props.studyId })}>upload texts</a>.</p>}
            >
              <div class="table-wrap">
                <table class="cases" aria-label="Cases">
                  <thead>
                    <tr>
                      <th scope="col">Case</th>
                      <th scope="col">Kind</th>
                      <th scope="col">Texts (speaker)</th>
                      <For each={s().attributes}>{(a) => <th scope="col">{a.name} <span class="muted">({TYPE_TEXT[a.type]})</span></th>}</For>
                      <Show when={canEdit()}><th scope="col"><span class="sr-only">Actions</span></th></Show>
                    </tr>
                  </thead>
                  <tbody>
                    <For each={s().cases}>
                      {(c) => (
                        <tr>
                          <th scope="row">{c.name}</th>
                          <td>{c.kind}</td>
                          <td>
                            <For each={c.textIds} fallback={<span class="muted">none</span>}>
                              {(t) => <span class="tag"><a href={href({ name: 'coding', studyId: props.studyId, textId: t })}>{titleOf(t)}</a>{c.speakers[t] ? ` (${c.speakers[t]})` : ''}</span>}
                            </For>
                          </td>
                          <For each={s().attributes}>
                            {(a) => (
                              <td>
                                <Cell def={a} value={cellText(c.values[a.id])} label={`${a.name} of ${c.name}`} disabled={!canEdit()} invalid={bad() === `${c.id}/${a.id}`} onCommit={(raw) => setCell(c, a, raw)} />
                              </td>
                            )}
                          </For>
                          <Show when={canEdit()}>
                            <td><button type="button" class="danger" onClick={() => confirm(`Remove the case ${c.name}? Its attribute values go too; texts stay.`) && attempt(() => removeCase(doc()!, c.id))}>Remove</button></td>
                          </Show>
                        </tr>
                      )}
                    </For>
                  </tbody>
                </table>
              </div>
            </Show>
            <Show when={canEdit()}>
              <form class="inline-form" aria-label="Add a case" onSubmit={(e) => { e.preventDefault(); attempt(() => { addCase(doc()!, { name: caseName() }); setCaseName(''); }); }}>
                <label>New case<input required value={caseName()} onInput={(e) => setCaseName(e.currentTarget.value)} /></label>
                <button type="submit">Add case</button>
              </form>
              <form class="inline-form" aria-label="Add an attribute" onSubmit={(e) => {
                e.preventDefault();
                attempt(() => {
                  defineAttribute(doc()!, { name: attrName(), type: attrType(), ...(attrType() === 'choice' ? { choices: choices().split(',').map((x) => x.trim()).filter(Boolean) } : {}) });
                  setAttrName('');
                  setChoices('');
                });
              }}>
                <label>New attribute<input required value={attrName()} onInput={(e) => setAttrName(e.currentTarget.value)} /></label>
                <label>Type
                  <select value={attrType()} onChange={(e) => setAttrType(e.currentTarget.value as AttributeType)}>
                    <For each={ATTRIBUTE_TYPES}>{(t) => <option value={t}>{TYPE_TEXT[t]}</option>}</For>
                  </select>
                </label>
                <Show when={attrType() === 'choice'}>
                  <label>Choices, separated by commas<input required value={choices()} onInput={(e) => setChoices(e.currentTarget.value)} /></label>
                </Show>
                <button type="submit">Add attribute</button>
              </form>
            </Show>
          </>
        )}
      </Show>
    </main>
  );
}

function Cell(props: { def: AttributeDef; value: string; label: string; disabled: boolean; invalid: boolean; onCommit: (raw: string) => void }) {
  if (props.def.type === 'boolean' || props.def.type === 'choice') {
    const options = props.def.type === 'boolean' ? ['yes', 'no'] : props.def.choices ?? [];
    return (
      <select aria-label={props.label} disabled={props.disabled} aria-invalid={props.invalid ? 'true' : undefined} value={props.value} onChange={(e) => props.onCommit(e.currentTarget.value)}>
        <option value="">—</option>
        <For each={options}>{(o) => <option value={o}>{o}</option>}</For>
      </select>
    );
  }
  return (
    <input
      aria-label={props.label}
      disabled={props.disabled}
      aria-invalid={props.invalid ? 'true' : undefined}
      type={props.def.type === 'date' ? 'date' : 'text'}
      inputMode={props.def.type === 'number' ? 'decimal' : undefined}
      value={props.value}
      size={props.def.type === 'number' ? 6 : 14}
      onChange={(e) => props.onCommit(e.currentTarget.value)}
    />
  );
}
