/**
 * Starting a round: a name, the texts, the participants, the unit of comparison, the statistic and a
 * short purpose. The server checks all of it (and who may start a round) and its refusal is shown as it
 * words it. A reflexive study is offered no statistic: it gets differences, not coefficients.
 */
import { For, Show, createResource, createSignal } from 'solid-js';
import type { Me } from '../../api/types.js';
import { api } from '../../api/client.js';
import { roundsApi } from '../../api/rounds.js';
import { errorMessage } from '../../api/errors.js';
import type { StudyScope } from '../study/study-context.js';
import { Loading } from '../../ui/Loading.js';

const UNITS: Array<[string, string]> = [['turn', 'Speaker turn'], ['paragraph', 'Paragraph'], ['sentence', 'Sentence'], ['span', 'Free spans (unitizing)']];
const STATISTICS: Array<[string, string]> = [
  ['krippendorff-alpha', "Krippendorff's alpha"], ['cohen-kappa', "Cohen's kappa (two coders; mean over pairs with more)"],
  ['scott-pi', "Scott's pi"], ['fleiss-kappa', "Fleiss' kappa"], ['percent-agreement', 'Percent agreement'],
];
const CODING_ROLES = ['owner', 'lead', 'coder', 'trainee'];

export function RoundSetup(props: { studyId: string; scope: StudyScope; me: Me; onStarted: (roundId: string) => void }) {
  const [texts] = createResource(() => props.studyId, (id) => api.texts(id));
  const [members] = createResource(() => props.studyId, (id) => api.members(id));
  const [name, setName] = createSignal('');
  const [purpose, setPurpose] = createSignal('');
  const [textIds, setTextIds] = createSignal<string[]>([]);
  const [people, setPeople] = createSignal<string[]>([]);
  const [unit, setUnit] = createSignal('turn');
  const [statistic, setStatistic] = createSignal('krippendorff-alpha');
  const [error, setError] = createSignal('');
  const [busy, setBusy] = createSignal(false);
  const reflexive = () => props.scope.study()?.mode === 'reflexive';
  const toggle = (list: string[], id: string, on: boolean) => (on ? [...new Set([...list, id])] : list.filter((x) => x !== id));

  const start = async (e: Event) => {
    e.preventDefault();
    setError('');
    if (!name().trim()) return setError('Give the round a name.');
    if (textIds().length === 0) return setError('Choose at least one text.');
    if (people().length < 2) return setError('Choose at least two participants: agreement needs two coders.');
    setBusy(true);
    try {
      const r = await roundsApi.create(props.studyId, {
        name: name().trim(),
        textIds: textIds(),
        participantIds: people(),
        unit: unit(),
        statistic: unit() === 'span' ? 'krippendorff-alpha' : statistic(),
        ...(purpose().trim() ? { purpose: purpose().trim() } : {}),
      });
      props.onStarted(r.id);
    } catch (err) {
      setError(`The round was not started: ${errorMessage(err)}`);
    } finally {
      setBusy(false);
    }
  };

  return (
    <section aria-labelledby="setup-h" class="round-setup">
      <h2 id="setup-h">Start a round</h2>
      <form onSubmit={(e) => void start(e)} aria-labelledby="setup-h" data-testid="round-setup">
        <label>Name <input value={name()} onInput={(e) => setName(e.currentTarget.value)} placeholder="Round 1: first four codes" /></label>
        <label>Purpose <textarea rows="2" value={purpose()} onInput={(e) => setPurpose(e.currentTarget.value)} placeholder="What this round should settle" /></label>
        <Loading loading={texts.loading || members.loading} error={texts.error ?? members.error} what="the texts and members">
          <fieldset>
            <legend>Texts</legend>
            <For each={texts()}>
              {(t) => (
                <label class="check">
                  <input type="checkbox" checked={textIds().includes(t.id)} onChange={(e) => setTextIds(toggle(textIds(), t.id, e.currentTarget.checked))} />
                  {t.title}
                </label>
              )}
            </For>
          </fieldset>
          <fieldset>
            <legend>Participants</legend>
            <For each={(members() ?? []).filter((m) => CODING_ROLES.includes(m.role))}>
              {(m) => (
                <label class="check">
                  <input type="checkbox" checked={people().includes(m.userId)} onChange={(e) => setPeople(toggle(people(), m.userId, e.currentTarget.checked))} />
                  {m.name} <span class="muted">({m.role}{m.userId === props.me.id ? ', you' : ''})</span>
                </label>
              )}
            </For>
          </fieldset>
        </Loading>
        <label>Unit of comparison
          <select value={unit()} onChange={(e) => setUnit(e.currentTarget.value)}>
            <For each={UNITS}>{([k, v]) => <option value={k}>{v}</option>}</For>
          </select>
        </label>
        <Show
          when={!reflexive()}
          fallback={<p class="muted">This study is run in the reflexive mode: no coefficient is computed; the round shows the coders' differences side by side for discussion.</p>}
        >
          <label>Statistic
            <select value={unit() === 'span' ? 'krippendorff-alpha' : statistic()} disabled={unit() === 'span'} onChange={(e) => setStatistic(e.currentTarget.value)}>
              <For each={STATISTICS}>{([k, v]) => <option value={k}>{v}</option>}</For>
            </select>
          </label>
          <Show when={unit() === 'span'}><p class="muted">Free spans are compared with Krippendorff's unitizing alpha.</p></Show>
        </Show>
        <button type="submit" disabled={busy()}>Start the round</button>
        <Show when={error()}><p class="error" role="alert" data-testid="setup-error">{error()}</p></Show>
      </form>
    </section>
  );
}
