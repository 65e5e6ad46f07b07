import { createSignal, For, Index, Show } from 'solid-js';
import { countOf } from '../../ui/count-words.js';
import { createStore, produce } from 'solid-js/store';
import { ImportRefusal, setupApi, type ImportedText, type Preview } from '../../api/setup-api.js';
import { errorMessage } from '../../api/errors.js';
import { formatTime } from '../../doc/time.js';
import { href } from '../../ui/router.js';
import { DataNotice } from '../../ui/DataNotice.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav, allowed } from '../study/StudyNav.js';
import { useCases } from '../cases/use-cases.js';
import { applyMapping, guessChoice, type CaseChoice } from './mapping.js';

type FileState = 'reading' | 'ready' | 'refused' | 'importing' | 'done' | 'failed';
interface Item {
  key: number;
  file: File;
  state: FileState;
  preview?: Preview;
  error?: string;
  /** Where in the file the importer stopped, when it said. */
  place?: string;
  progress: number;
  choices: Record<string, CaseChoice>;
  text?: ImportedText;
  linked?: number;
}

const ACCEPT = '.txt,.text,.vtt,.srt,.docx,text/plain,text/vtt,application/x-subrip,application/vnd.openxmlformats-officedocument.wordprocessingml.document';
let nextKey = 1;

/** Upload transcripts: preview each file, map its speakers to cases, then import, one file at a time. */
export function Upload(props: { studyId: string; scope: StudyScope }) {
  const [items, setItems] = createStore<Item[]>([]);
  const [running, setRunning] = createSignal(false);
  const casesState = useCases(props.scope);
  const canImport = () => allowed(props.scope, 'text.import');
  const canMap = () => allowed(props.scope, 'codebook.write');
  const update = (key: number, f: (it: Item) => void) => setItems((it) => it.key === key, produce(f));

  const add = async (files: FileList | null) => {
    for (const file of Array.from(files ?? [])) {
      const key = nextKey++;
      setItems(items.length, { key, file, state: 'reading', progress: 0, choices: {} });
      try {
        const preview = await setupApi.preview(props.studyId, file);
        const cases = casesState()?.cases ?? [];
        const choices = Object.fromEntries(preview.speakers.map((s) => [s.label, canMap() ? guessChoice(s.label, cases) : 'none'])) as Record<string, CaseChoice>;
        update(key, (it) => Object.assign(it, { state: 'ready', preview, choices }));
      } catch (err) {
        update(key, (it) => Object.assign(it, { state: 'refused', ...refusal(err) }));
      }
    }
  };

  const importAll = async () => {
    setRunning(true);
    const created = new Map<string, string>();
    for (const it of items.filter((x) => x.state === 'ready')) {
      update(it.key, (x) => Object.assign(x, { state: 'importing', progress: 0 }));
      try {
        const text = await setupApi.importFile(props.studyId, it.file, (p) => update(it.key, (x) => void (x.progress = p)));
        let linked = 0;
        const cb = props.scope.codebook();
        if (cb && canMap()) {
          await cb.whenReady;
          linked = applyMapping(cb.doc, text.id, { ...it.choices }, created);
        }
        update(it.key, (x) => Object.assign(x, { state: 'done', progress: 1, text, linked }));
      } catch (err) {
        update(it.key, (x) => Object.assign(x, { state: 'failed', ...refusal(err) }));
      }
    }
    setRunning(false);
  };

  const ready = () => items.filter((x) => x.state === 'ready').length;
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="upload" />
      <h2>Upload texts</h2>
      <Show when={canImport()} fallback={<p>Only owners and leads upload texts. <a href={href({ name: 'study', studyId: props.studyId })}>Back to the texts</a>.</p>}>
        <p>
          Plain text (<code>Name: words</code> lines, optional <code>[hh:mm:ss]</code> times), WebVTT, SRT or DOCX. Each file is read first and
          shown below; nothing is stored until you press Import. A file the importer cannot read is shown with the place of the problem and is not imported.
        </p>
        <label class="file-pick">
          Choose transcript files
          <input type="file" multiple accept={ACCEPT} data-testid="file-input" onChange={(e) => { void add(e.currentTarget.files); e.currentTarget.value = ''; }} />
        </label>
        <ol class="uploads" aria-label="Files to import">
          <For each={items}>
            {(it) => (
              <li class="upload" data-state={it.state} data-testid="upload-item" aria-label={it.file.name}>
                <div class="upload-head">
                  <strong>{it.file.name}</strong>
                  <span class="tag">{STATE_TEXT[it.state]}</span>
                  <Show when={it.state === 'ready' || it.state === 'refused'}>
                    <button type="button" class="link" onClick={() => setItems((all) => all.filter((x) => x.key !== it.key))}>Remove</button>
                  </Show>
                </div>
                <Show when={it.state === 'importing' || it.state === 'done'}>
                  <progress max="1" value={it.progress} aria-label={`Import of ${it.file.name}`} />
                </Show>
                <Show when={it.error}>
                  <p class="error" role="alert">{sentence(it.place && !it.error!.includes(it.place) ? `${it.place}: ${it.error}` : it.error!)} {it.state === 'refused' || it.state === 'failed' ? 'Nothing from this file was stored.' : ''}</p>
                </Show>
                <Show when={it.state === 'done' && it.text}>
                  <p role="status">
                    Imported as <a href={href({ name: 'coding', studyId: props.studyId, textId: it.text!.id })}>{it.text!.title}</a> ({countOf(it.text!.wordCount, 'word')})
                    {it.linked ? `; linked to ${it.linked} case(s).` : '.'}
                  </p>
                </Show>
                <Show when={it.preview && (it.state === 'ready' || it.state === 'importing')}>
                  <PreviewView item={it} cases={casesState()?.cases ?? []} canMap={canMap()} onChoose={(label, c) => update(it.key, (x) => void (x.choices[label] = c))} />
                </Show>
              </li>
            )}
          </For>
        </ol>
        <Show when={items.length === 0}><p class="muted">No files chosen yet.</p></Show>
        <div class="row">
          <button type="button" disabled={running() || ready() === 0} onClick={() => void importAll()}>
            {running() ? 'Importing…' : `Import ${countOf(ready(), 'file')}`}
          </button>
          <a href={href({ name: 'study', studyId: props.studyId })}>Back to the texts</a>
        </div>
      </Show>
      <DataNotice />
    </main>
  );
}

const STATE_TEXT: Record<FileState, string> = {
  reading: 'reading…',
  ready: 'ready to import',
  refused: 'cannot be imported',
  importing: 'importing…',
  done: 'imported',
  failed: 'import failed',
};

/** The importer's message as a sentence, so the note after it reads on. */
const sentence = (s: string) => (/[.!?)]$/.test(s.trim()) ? s.trim() : `${s.trim()}.`);

function refusal(err: unknown): { error: string; place?: string } {
  if (err instanceof ImportRefusal) return { error: err.message, ...(err.line ? { place: `line ${err.line}${err.column ? `, column ${err.column}` : ''}` } : {}) };
  return { error: errorMessage(err) };
}

function PreviewView(props: { item: Item; cases: Array<{ id: string; name: string }>; canMap: boolean; onChoose: (label: string, c: CaseChoice) => void }) {
  const p = () => props.item.preview!;
  return (
    <div class="preview-box">
      <p>
        {p().format.toUpperCase()} · {countOf(p().turnCount, 'turn')} · {countOf(p().wordCount, 'word')}
        {p().timestamps ? ` · ${formatTime(p().timestamps!.firstMs)}–${formatTime(p().timestamps!.lastMs)}` : ' · no timestamps'}
        {p().unlabelledTurns ? ` · ${countOf(p().unlabelledTurns, 'turn')} without a speaker` : ''}
      </p>
      <Show when={p().speakers.length > 0} fallback={<p class="muted">No speaker labels found: the text is imported as it is.</p>}>
        <table class="speakers">
          <caption>Speakers and the case (participant) each one is</caption>
          <thead><tr><th scope="col">Speaker</th><th scope="col">Turns</th><th scope="col">Words</th><th scope="col">Case</th></tr></thead>
          <tbody>
            <Index each={p().speakers}>
              {(s) => (
                <tr>
                  <th scope="row">{s().label}</th>
                  <td>{s().turns}</td>
                  <td>{s().words}</td>
                  <td>
                    <select aria-label={`Case for ${s().label} in ${props.item.file.name}`} disabled={!props.canMap} value={props.item.choices[s().label] ?? 'none'} onChange={(e) => props.onChoose(s().label, e.currentTarget.value as CaseChoice)}>
                      <option value="none">not a case</option>
                      <option value="new">new case “{s().label}”</option>
                      <For each={props.cases}>{(c) => <option value={`case:${c.id}`}>{c.name}</option>}</For>
                    </select>
                  </td>
                </tr>
              )}
            </Index>
          </tbody>
        </table>
      </Show>
      <details>
        <summary>First turns</summary>
        <ol class="turn-sample">
          <For each={p().turns}>
            {(t) => (
              <li>
                <Show when={t.startMs !== null}><span class="time">{formatTime(t.startMs!)}</span> </Show>
                <Show when={t.speaker}><strong>{t.speaker}:</strong> </Show>
                {t.text}
              </li>
            )}
          </For>
        </ol>
      </details>
    </div>
  );
}
