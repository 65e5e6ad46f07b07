import { createSignal, For, Show } from 'solid-js';
import { deidApi, type Candidate, type Scan } from '../../api/deid-api.js';
import { holdReloadWhile } from '../../sync/open-doc.js';
import { createSubmit } from '../../ui/forms.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav, allowed } from '../study/StudyNav.js';
import { PseudonymKey } from './PseudonymKey.js';

type Decision = 'accept' | 'reject';

const purgedKey = (studyId: string) => `gloss-deid-purged:${studyId}`;
/** The answer of a purge made in this tab before it reloaded, read once. */
function takePurgeResult(studyId: string): { scan: Scan; keyEntries: number } | null {
  const raw = sessionStorage.getItem(purgedKey(studyId));
  sessionStorage.removeItem(purgedKey(studyId));
  try {
    return raw ? (JSON.parse(raw) as { scan: Scan; keyEntries: number }) : null;
  } catch {
    return null;
  }
}
interface Row extends Candidate { decision: Decision; pseudonym: string }

const KIND_WORDS: Record<string, string> = {
  person: 'person', place: 'place', organisation: 'organisation', date: 'date', age: 'age',
  phone: 'phone number', email: 'e-mail address', address: 'street address', listed: 'from your list',
};

/**
 * De-identification of a study (owner, lead; the server decides): find candidate identifiers in every
 * text, review each (accept, edit the pseudonym, reject), apply, then purge the originals and see the
 * database scanned for them. The owner also manages the pseudonym key here.
 */
export function DeidScreen(props: { studyId: string; scope: StudyScope }) {
  const [terms, setTerms] = createSignal('');
  const [rows, setRows] = createSignal<Row[] | null>(null);
  const [textCount, setTextCount] = createSignal(0);
  const [applied, setApplied] = createSignal<string | null>(null);
  const [scan, setScan] = createSignal<{ scan: Scan; keyEntries: number } | null>(takePurgeResult(props.studyId));
  const [confirmPurge, setConfirmPurge] = createSignal(false);
  const [changes, setChanges] = createSignal(0);
  const submit = createSubmit();

  const find = (e: Event) => {
    e.preventDefault();
    setApplied(null);
    void submit.run(async () => {
      const list = terms().split('\n').map((t) => t.trim()).filter((t) => t.length >= 2);
      const res = await deidApi.candidates(props.studyId, list);
      setTextCount(res.texts.length);
      setRows(res.candidates.map((c) => ({ ...c, decision: 'accept', pseudonym: c.suggestion })));
    });
  };
  const update = (i: number, patch: Partial<Row>) => setRows((all) => all && all.map((r, j) => (j === i ? { ...r, ...patch } : r)));
  const setAll = (decision: Decision) => setRows((all) => all && all.map((r) => ({ ...r, decision })));
  const accepted = () => (rows() ?? []).filter((r) => r.decision === 'accept' && r.pseudonym.trim().length > 0);
  const apply = () =>
    void submit.run(async () => {
      const res = await deidApi.apply(props.studyId, accepted().map((r) => ({ original: r.original, pseudonym: r.pseudonym.trim(), kind: r.kind })));
      const e = res.elsewhere;
      const others = [[e.codebook, 'the codebook'], [e.memos, 'memos and replies'], [e.notes, 'segment notes'], [e.comments, 'comments'], [e.titles, 'text titles'], [e.study, 'the study’s title, description and ethics note'], [e.rounds, 'round names and purposes'], [e.audit, 'earlier audit entries']]
        .filter(([n]) => (n as number) > 0)
        .map(([n, where]) => `${n} in ${where}`);
      setApplied(
        `Replaced ${res.occurrences} occurrence(s) in ${res.texts} text(s); ${res.segmentsMoved} segment boundary(ies) moved to stay on their words.` +
          (others.length > 0 ? ` Also replaced: ${others.join(', ')}.` : ''),
      );
      setRows(null);
      setChanges((n) => n + 1);
      setScan(await deidApi.scan(props.studyId));
    });
  const purge = () =>
    void submit.run(async () => {
      // This tab's own open documents are rebuilt too, so it reloads once the purge has answered; the
      // answer waits in sessionStorage and is shown after the reload.
      const res = await holdReloadWhile(
        deidApi.purge(props.studyId).then((r) => {
          sessionStorage.setItem(purgedKey(props.studyId), JSON.stringify({ scan: r.scan, keyEntries: r.keyEntries }));
          return r;
        }),
      );
      setConfirmPurge(false);
      setScan({ scan: res.scan, keyEntries: res.keyEntries });
    });
  const check = () => void submit.run(async () => void setScan(await deidApi.scan(props.studyId)));

  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="deid" />
      <div class="two-col">
        <section aria-labelledby="deid-h">
          <h2 id="deid-h">De-identify the texts</h2>
          <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>

          <h3>1. Find identifiers</h3>
          <form onSubmit={find} class="stacked" aria-label="Find identifiers">
            <p class="muted">
              Every text of the study is searched for names of people, places and organisations, dates, ages, phone numbers,
              e-mail and street addresses — and so are the codebook (definitions, examples), memos, jottings and their replies,
              segment notes, comments, the texts’ titles, the study’s title, description and ethics note, and the rounds’ names and purposes. Add words only your study knows (a ward’s nickname, a village, a
              club), one per line.
            </p>
            <label>
              Study-specific terms
              <textarea rows={3} value={terms()} onInput={(e) => setTerms(e.currentTarget.value)} />
            </label>
            <button type="submit" disabled={submit.busy()}>Find identifiers</button>
          </form>

          <Show when={rows()}>
            <h3>2. Review each candidate</h3>
            <Show when={rows()!.length > 0} fallback={<p role="status">Nothing found in {textCount()} text(s).</p>}>
              <p class="muted">
                {rows()!.length} candidate(s) in {textCount()} text(s). The same words get the same pseudonym in every text; give
                two spellings of one person the same pseudonym. Rejected candidates stay as they are.
              </p>
              <p>
                <button type="button" class="quiet" onClick={() => setAll('accept')}>Accept all</button>{' '}
                <button type="button" class="quiet" onClick={() => setAll('reject')}>Reject all</button>
              </p>
              <table class="deid-review" aria-label="Candidates">
                <thead><tr><th scope="col">Words</th><th scope="col">Found as</th><th scope="col">Where</th><th scope="col">Replace with</th><th scope="col">Decision</th></tr></thead>
                <tbody>
                  <For each={rows()}>
                    {(r, i) => (
                      <tr classList={{ rejected: r.decision === 'reject' }} data-testid="candidate">
                        <th scope="row">{r.original}</th>
                        <td>{KIND_WORDS[r.kind] ?? r.kind}</td>
                        <td>
                          <span class="muted">{r.occurrences}× — in {r.where.map((w) => (w === 'texts' ? `${r.textIds.length} text(s)` : w)).join(', ')}</span>
                          <br /><small>{r.context}</small>
                        </td>
                        <td><input aria-label={`Pseudonym for ${r.original}`} value={r.pseudonym} disabled={r.decision === 'reject'} onInput={(e) => update(i(), { pseudonym: e.currentTarget.value })} /></td>
                        <td>
                          <label><input type="radio" name={`d${i()}`} checked={r.decision === 'accept'} onChange={() => update(i(), { decision: 'accept' })} /> accept</label>{' '}
                          <label><input type="radio" name={`d${i()}`} checked={r.decision === 'reject'} onChange={() => update(i(), { decision: 'reject' })} /> reject</label>
                        </td>
                      </tr>
                    )}
                  </For>
                </tbody>
              </table>
              <button type="button" disabled={submit.busy() || accepted().length === 0} onClick={apply}>Apply {accepted().length} replacement(s)</button>
            </Show>
          </Show>
          <Show when={applied()}><p role="status" data-testid="applied">{applied()}</p></Show>

          <h3>3. Purge the originals</h3>
          <p>
            Replacing a name is not removing it: the edit history, the named versions and every device that opened the study
            still hold the original words. The purge rebuilds every document of the study from its current words only — the
            texts, each coder’s segments and notes, the codebook and the memos — keeps every segment, example and jotting on its
            words (their quotes do not change), and deletes the <strong>edit history and all named versions</strong> of the
            texts, the codebook and the memos. Everyone who has the study open is asked to reload, and the copies their browsers
            kept are discarded.
          </p>
          <Show
            when={confirmPurge()}
            fallback={<button type="button" class="danger" disabled={submit.busy()} onClick={() => setConfirmPurge(true)}>Purge the originals…</button>}
          >
            <div role="alertdialog" aria-label="Purge the originals?" class="confirm">
              <p>Purge every document of this study now? The named versions of its texts, codebook and memos, and their edit history, are deleted for good.</p>
              <button type="button" class="danger" disabled={submit.busy()} onClick={purge}>Purge now</button>{' '}
              <button type="button" class="quiet" onClick={() => setConfirmPurge(false)}>Not now</button>
            </div>
          </Show>
          <Show when={submit.busy()}><p role="status" class="muted">Working…</p></Show>

          <Show when={scan()}>
            {(s) => (
              <div class="scan" data-testid="scan-result" role="status">
                <p classList={{ 'scan-clear': s().scan.occurrences === 0 }}>
                  <strong>{s().scan.occurrences === 0 ? '0 occurrences left in the database' : `${s().scan.occurrences} row(s) in the database still hold original words`}</strong>
                </p>
                <p class="muted">
                  Checked just now by searching {s().scan.tablesScanned} tables of this study (text, JSON and binary columns) for the {s().keyEntries} original(s)
                  in the pseudonym key; the key itself is not counted.
                  <Show when={s().scan.occurrences > 0}> Found in: {Object.entries(s().scan.byTable).map(([t, n]) => `${t} (${n})`).join(', ')}.</Show>
                </p>
              </div>
            )}
          </Show>
          <p><button type="button" class="quiet" disabled={submit.busy()} onClick={check}>Check the database again</button></p>

          <Show when={allowed(props.scope, 'deid.key')}>
            <PseudonymKey studyId={props.studyId} changes={changes()} />
          </Show>
        </section>
        <aside aria-labelledby="deid-caution-h" class="cautions">
          <h2 id="deid-caution-h">Before you rely on it</h2>
          <ul>
            <li>The finder misses things and finds too much: read every text yourself too.</li>
            <li>Indirect identifiers — a rare job, an age with a small village, a unique event — can identify a person without any name.</li>
            <li>Memos, jottings, comments and codebook examples can still identify people through what they describe, not only by name; earlier exports and copies made outside Gloss are not changed here.</li>
            <li>The pseudonym key links pseudonyms to people: keep it apart from the texts, export it once to a safe place, then delete it here.</li>
            <li>Your study’s ethics approval, its consent terms and your data-protection officer decide what is enough; Gloss does not make a study compliant.</li>
          </ul>
        </aside>
      </div>
    </main>
  );
}
