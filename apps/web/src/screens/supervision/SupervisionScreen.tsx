/**
 * Supervision (issue 9). Supervisors (owner, lead) assign texts to trainees and coders, choose each
 * text's reference layer, review an assignee's layer against it (the comparison of the review screen,
 * side by side), share the comparison, return the text with feedback or accept it, and follow each
 * trainee's agreement with the reference round by round. Everyone else sees the texts assigned to them,
 * each with its review state and what to look at again. The server decides every right; its refusals
 * are shown in words.
 */
import { For, Show, createResource, createSignal } from 'solid-js';
import { getCodes } from '@gloss/model';
import { api } from '../../api/client.js';
import { errorMessage } from '../../api/errors.js';
import type { Me } from '../../api/types.js';
import { href } from '../../ui/router.js';
import { useY } from '../../ui/use-ydoc.js';
import type { OpenDoc } from '../../sync/open-doc.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav, allowed } from '../study/StudyNav.js';
import { ComparePanel } from '../review/ReviewScreen.js';
import { ProgressChart } from './ProgressChart.js';
import { STATE_WORDS, supervisionApi, type Assignment, type Progress } from './supervision-api.js';

export function SupervisionScreen(props: { studyId: string; scope: StudyScope; me: Me }) {
  const supervisor = () => allowed(props.scope, 'supervision.manage');
  return (
    <main class="page supervision-page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="supervision" />
      <Show when={props.scope.study()} fallback={<p class="progress">Loading…</p>}>
        <Show when={supervisor()} fallback={<MyAssignments {...props} />}>
          <Supervise {...props} />
        </Show>
      </Show>
    </main>
  );
}

const key = (a: { textId: string; userId: string }) => `${a.textId}/${a.userId}`;

/** An assignee's view: their texts, each with its state and the supervisor's words. */
function MyAssignments(props: { studyId: string; scope: StudyScope; me: Me }) {
  const [mine] = createResource(() => props.studyId, (id) => supervisionApi.assignments(id));
  const [comparing, setComparing] = createSignal<string | null>(null);
  return (
    <section aria-labelledby="mine-h">
      <h2 id="mine-h">Texts assigned to you</h2>
      <p class="muted">Your supervisor reviews your coding of these texts against a reference. Comments on your segments are under <a href={href({ name: 'review', studyId: props.studyId })}>Review → Feedback for you</a>.</p>
      <Show when={!mine.error} fallback={<p role="alert">Could not load your texts: {errorMessage(mine.error)}</p>}>
        <ul class="assignment-list">
          <For each={mine()} fallback={<li class="muted">{mine.loading ? 'Loading…' : 'No text is assigned to you yet.'}</li>}>
            {(a) => (
              <li class="assignment" data-state={a.reviewState}>
                <p>
                  <a href={href({ name: 'coding', studyId: props.studyId, textId: a.textId })}>{a.textTitle}</a>{' '}
                  <span class={`state state-${a.reviewState}`}>{STATE_WORDS[a.reviewState]}</span>
                </p>
                <Show when={a.reviewNote}>
                  <p class="review-note"><strong>{a.reviewState === 'returned' ? 'Look again at: ' : 'Your supervisor wrote: '}</strong>{a.reviewNote}</p>
                </Show>
                <Show when={a.comparisonShared && a.reference}>
                  <button type="button" class="secondary" onClick={() => setComparing(comparing() === key(a) ? null : key(a))}>
                    {comparing() === key(a) ? 'Hide the comparison' : 'Compare with the reference'}
                  </button>
                  <Show when={comparing() === key(a)}>
                    <AssignmentCompare studyId={props.studyId} scope={props.scope} me={props.me} assignment={a} tolerance={2} />
                  </Show>
                </Show>
              </li>
            )}
          </For>
        </ul>
      </Show>
    </section>
  );
}

/** The comparison of one assignee's layer with the text's reference (once the codebook is open, for code labels). */
function AssignmentCompare(props: { studyId: string; scope: StudyScope; me: Me; assignment: Assignment; tolerance: number }) {
  return (
    <Show when={props.scope.codebook()} keyed fallback={<p class="progress">Opening the codebook…</p>}>
      {(cb) => <AssignmentCompareWith cb={cb} {...props} />}
    </Show>
  );
}

function AssignmentCompareWith(props: { cb: OpenDoc; studyId: string; scope: StudyScope; me: Me; assignment: Assignment; tolerance: number }) {
  const codes = useY(props.cb.doc.getMap('codes'), () => getCodes(props.cb.doc));
  const label = (id: string) => codes().find((c) => c.id === id)?.label ?? 'a code no longer in the codebook';
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const nameOf = (id: string) => (id === props.me.id ? 'you' : members()?.find((m) => m.userId === id)?.name ?? 'a coder');
  const [detail] = createResource(() => props.assignment.textId, (id) => api.text(id));
  const layer = () => detail()?.layers.find((l) => l.coderId === props.assignment.userId && !l.round)?.room;
  return (
    <Show when={detail()} fallback={<p class="progress">Opening the text…</p>}>
      <Show when={layer() && props.assignment.reference} fallback={<p class="muted">{!props.assignment.reference ? 'Choose a reference for this text first.' : `${props.assignment.userName} has no layer on this text yet.`}</p>}>
        <ComparePanel
          studyId={props.studyId}
          label={label}
          nameOf={nameOf}
          changes={() => 0}
          meId={props.me.id}
          preset={{ textId: props.assignment.textId, layer: layer()!, reference: props.assignment.reference!, tolerance: props.tolerance }}
        />
      </Show>
    </Show>
  );
}

function Supervise(props: { studyId: string; scope: StudyScope; me: Me }) {
  const [assignments, { refetch }] = createResource(() => props.studyId, (id) => supervisionApi.assignments(id));
  const [texts] = createResource(() => props.studyId, (id) => api.texts(id));
  const [members] = createResource(() => props.studyId, (id) => api.members(id));
  const [settings, { refetch: refetchSettings }] = createResource(() => props.studyId, (id) => supervisionApi.settings(id));
  const [textId, setTextId] = createSignal('');
  const [userId, setUserId] = createSignal('');
  const [message, setMessage] = createSignal('');
  const [open, setOpen] = createSignal<string | null>(null);
  const assignable = () => (members() ?? []).filter((m) => m.role === 'trainee' || m.role === 'coder');

  const assign = async () => {
    if (!textId() || !userId()) return setMessage('Choose a text and a person first.');
    try {
      const a = await supervisionApi.assign(props.studyId, textId(), userId());
      setMessage(`Assigned “${a.textTitle}” to ${a.userName}.`);
      await refetch();
    } catch (err) {
      setMessage(`Not assigned: ${errorMessage(err)}`);
    }
  };

  return (
    <>
      <section aria-labelledby="assign-h">
        <h2 id="assign-h">Assign texts</h2>
        <p class="muted">A trainee sees only the texts assigned to them, and nothing of others’ coding on them unless you share the comparison. Coders see every text; an assignment tells them where to work.</p>
        <form class="assign-form" onSubmit={(e) => { e.preventDefault(); void assign(); }}>
          <label for="assign-text">Text</label>
          <select id="assign-text" value={textId()} onChange={(e) => setTextId(e.currentTarget.value)}>
            <option value="">Choose a text</option>
            <For each={texts()}>{(t) => <option value={t.id}>{t.title}</option>}</For>
          </select>
          <label for="assign-person">Person</label>
          <select id="assign-person" value={userId()} onChange={(e) => setUserId(e.currentTarget.value)}>
            <option value="">Choose a trainee or coder</option>
            <For each={assignable()}>{(m) => <option value={m.userId}>{m.name} ({m.role})</option>}</For>
          </select>
          <button type="submit">Assign</button>
        </form>
        <p class="message" role="status">{message()}</p>
      </section>

      <section aria-labelledby="assignments-h">
        <h2 id="assignments-h">Assignments</h2>
        <Show when={!assignments.error} fallback={<p role="alert">Could not load the assignments: {errorMessage(assignments.error)}</p>}>
          <table class="assignments">
            <thead><tr><th scope="col">Text</th><th scope="col">Person</th><th scope="col">State</th><th scope="col">Comparison shared</th><th scope="col"><span class="visually-hidden">Actions</span></th></tr></thead>
            <tbody>
              <For each={assignments()} fallback={<tr><td colSpan={5} class="muted">{assignments.loading ? 'Loading…' : 'Nothing assigned yet.'}</td></tr>}>
                {(a) => (
                  <tr data-state={a.reviewState}>
                    <th scope="row">{a.textTitle}</th>
                    <td>{a.userName} <span class="muted">({a.role})</span></td>
                    <td><span class={`state state-${a.reviewState}`}>{STATE_WORDS[a.reviewState]}</span></td>
                    <td>{a.comparisonShared ? 'yes' : 'no'}</td>
                    <td>
                      <button type="button" aria-expanded={open() === key(a)} onClick={() => setOpen(open() === key(a) ? null : key(a))}>
                        {open() === key(a) ? 'Close review' : `Review ${a.userName}`}
                      </button>
                    </td>
                  </tr>
                )}
              </For>
            </tbody>
          </table>
        </Show>
        {/* Outside the table's rows: a refetched list must not rebuild the open review (its drafts stay). */}
        <Show when={open()} keyed>
          {(k) => (
            <Show when={assignments()?.find((a) => key(a) === k)}>
              {(a) => <ReviewAssignment studyId={props.studyId} scope={props.scope} me={props.me} assignment={a()} tolerance={settings()?.toleranceWords ?? 2} onChanged={() => void refetch()} onClosed={() => setOpen(null)} />}
            </Show>
          )}
        </Show>
      </section>

      <ProgressSection studyId={props.studyId} settings={settings()} onSettings={() => void refetchSettings()} />
    </>
  );
}

/** One assignment under review: its reference, sharing, the comparison, and the review decision. */
function ReviewAssignment(props: { studyId: string; scope: StudyScope; me: Me; assignment: Assignment; tolerance: number; onChanged: () => void; onClosed: () => void }) {
  const a = () => props.assignment;
  const [detail] = createResource(() => a().textId, (id) => api.text(id));
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const [reference, setReference] = createSignal(a().reference ?? '');
  const [note, setNote] = createSignal(a().reviewNote);
  const [message, setMessage] = createSignal('');
  const [shown, setShown] = createSignal(a().reference ?? '');
  const layerName = (l: { coderId: string | null; kind?: string; round?: string | null; mine?: boolean }) =>
    l.kind === 'consensus' ? 'Consensus layer of a round' : l.mine ? 'Your layer' : `${members()?.find((m) => m.userId === l.coderId)?.name ?? 'a coder'}’s layer${l.round ? ' (in a round)' : ''}`;
  const candidates = () => (detail()?.layers ?? []).filter((l) => l.coderId !== a().userId);
  const act = async (f: () => Promise<unknown>, done: string) => {
    try {
      await f();
      setMessage(done);
      props.onChanged();
    } catch (err) {
      setMessage(`Not saved: ${errorMessage(err)}`);
    }
  };
  return (
    <div class="review-assignment">
      <h3>Review: {a().userName} on “{a().textTitle}”</h3>
      <form class="reference-form" onSubmit={(e) => { e.preventDefault(); void act(async () => { await supervisionApi.setReference(a().textId, reference() || null); setShown(reference()); }, 'Reference saved.'); }}>
        <label for={`ref-${key(a())}`}>Reference for this text</label>
        <select id={`ref-${key(a())}`} value={reference()} onChange={(e) => setReference(e.currentTarget.value)} disabled={!detail()}>
          <option value="">No reference</option>
          <For each={candidates()}>{(l) => <option value={l.room} selected={l.room === reference()}>{layerName(l)}</option>}</For>
        </select>
        <button type="submit">Save reference</button>
        <label class="check">
          <input type="checkbox" checked={a().comparisonShared} onChange={(e) => { const on = e.currentTarget.checked; void act(() => supervisionApi.share(props.studyId, a(), on), on ? 'Comparison shared.' : 'Comparison no longer shared.'); }} />
          Share the comparison with {a().userName} (they may then read the reference layer of this text)
        </label>
      </form>
      <Show when={shown()} keyed fallback={<p class="muted">Choose and save a reference to compare.</p>}>
        {(ref) => <AssignmentCompare studyId={props.studyId} scope={props.scope} me={props.me} assignment={{ ...a(), reference: ref }} tolerance={props.tolerance} />}
      </Show>
      <form class="review-form" onSubmit={(e) => e.preventDefault()}>
        <label for={`note-${key(a())}`}>What to look at again (sent with a return)</label>
        <textarea id={`note-${key(a())}`} rows={3} value={note()} onInput={(e) => setNote(e.currentTarget.value)} />
        <div class="row">
          <button type="button" onClick={() => void act(() => supervisionApi.review(props.studyId, a(), 'returned', note()), 'Returned with feedback.')}>Return with feedback</button>
          <button type="button" onClick={() => void act(() => supervisionApi.review(props.studyId, a(), 'accepted', note()), 'Accepted.')}>Accept</button>
          <button type="button" class="secondary" onClick={() => { if (confirm(`Take “${a().textTitle}” away from ${a().userName}? A trainee loses access to it at once.`)) void act(async () => { await supervisionApi.unassign(props.studyId, a()); props.onClosed(); }, 'Unassigned.'); }}>Unassign</button>
        </div>
      </form>
      <p class="message" role="status">{message()}</p>
    </div>
  );
}

const fmt = (v: number | null) => (v === null ? '—' : v.toFixed(3));

function ProgressSection(props: { studyId: string; settings: { toleranceWords: number; driftThreshold: number } | undefined; onSettings: () => void }) {
  const [progress, { refetch }] = createResource(() => props.studyId, (id) => supervisionApi.progress(id));
  const [tolerance, setTolerance] = createSignal<number | null>(null);
  const [threshold, setThreshold] = createSignal<number | null>(null);
  const [message, setMessage] = createSignal('');
  const save = async () => {
    try {
      await supervisionApi.saveSettings(props.studyId, { toleranceWords: tolerance() ?? props.settings?.toleranceWords ?? 2, driftThreshold: threshold() ?? props.settings?.driftThreshold ?? 0.1 });
      setMessage('Settings saved.');
      props.onSettings();
      await refetch();
    } catch (err) {
      setMessage(`Not saved: ${errorMessage(err)}`);
    }
  };
  const reflexive = (p: Progress) => p.mode === 'reflexive';
  return (
    <section aria-labelledby="progress-h">
      <h2 id="progress-h">Progress across rounds</h2>
      <p class="muted">Each trainee’s round layers against the reference (the text’s chosen reference, else the round’s consensus layer), with the round’s statistic. Drift: a fall of more than the threshold since the trainee’s previous round.</p>
      <form class="settings-form" onSubmit={(e) => { e.preventDefault(); void save(); }}>
        <label for="sup-tolerance">Boundary tolerance (words)</label>
        <input id="sup-tolerance" type="number" min="0" max="1000" value={tolerance() ?? props.settings?.toleranceWords ?? 2} onInput={(e) => setTolerance(Math.max(0, Math.floor(Number(e.currentTarget.value) || 0)))} />
        <label for="sup-threshold">Drift threshold</label>
        <input id="sup-threshold" type="number" min="0" max="2" step="0.01" value={threshold() ?? props.settings?.driftThreshold ?? 0.1} onInput={(e) => setThreshold(Math.max(0, Number(e.currentTarget.value) || 0))} />
        <button type="submit">Save settings</button>
      </form>
      <p class="message" role="status">{message()}</p>
      <Show when={!progress.error} fallback={<p role="alert">Could not load progress: {errorMessage(progress.error)}</p>}>
        <Show when={progress()} fallback={<p class="progress">Computing…</p>}>
          {(p) => (
            <Show when={p().trainees.length > 0} fallback={<p class="muted">No trainee has taken part in a revealed round yet.</p>}>
              <Show when={!reflexive(p())} fallback={<p class="muted">This study is run in the reflexive mode: no coefficient, only the counts of each category.</p>}>
                <ProgressChart progress={p()} />
              </Show>
              <table class="progress-table">
                <caption>Agreement with the reference per trainee and round</caption>
                <thead>
                  <tr><th scope="col">Trainee</th><th scope="col">Round</th><Show when={!reflexive(p())}><th scope="col">Statistic</th><th scope="col">Value</th></Show><th scope="col">Same</th><th scope="col">Missed</th><th scope="col">Extra</th><th scope="col">Other code</th><th scope="col">Other boundary</th><th scope="col">Drift</th></tr>
                </thead>
                <tbody>
                  <For each={p().trainees.flatMap((t) => t.points.map((pt) => ({ t, pt })))}>
                    {({ t, pt }) => (
                      <tr data-drift={pt.drift ? 'yes' : 'no'}>
                        <th scope="row">{t.name}</th>
                        <td>Round {pt.roundNumber}: {pt.roundName}</td>
                        <Show when={!reflexive(p())}><td>{pt.statistic} ({pt.unit})</td><td title={pt.note}>{fmt(pt.value)}{pt.note ? ` — ${pt.note}` : ''}</td></Show>
                        <td>{pt.counts.matched}</td><td>{pt.counts.missed}</td><td>{pt.counts.extra}</td><td>{pt.counts.otherCode}</td><td>{pt.counts.otherBoundary}</td>
                        <td>{pt.drift ? '▼ drift' : ''}</td>
                      </tr>
                    )}
                  </For>
                </tbody>
              </table>
              <p class="muted">{p().sources}</p>
            </Show>
          )}
        </Show>
      </Show>
    </section>
  );
}
