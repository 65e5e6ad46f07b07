/** A REFI-QDA project (.qdpx) or codebook (.qdc) from another program, into a new study owned by me. */
import { createResource, createSignal, For, Show } from 'solid-js';
import { analysisApi, type ImportReport } from '../../api/analysis.js';
import { errorMessage } from '../../api/errors.js';
import { ImportReportView } from './ImportReportView.js';

export function ImportProject(props: { onImported?: () => void }) {
  const [losses] = createResource(() => analysisApi.losses());
  const [title, setTitle] = createSignal('');
  const [file, setFile] = createSignal<File>();
  const [busy, setBusy] = createSignal(false);
  const [report, setReport] = createSignal<ImportReport>();
  const [failure, setFailure] = createSignal<string>();
  const run = async () => {
    const f = file();
    if (!f) return;
    setBusy(true);
    setReport();
    setFailure();
    try {
      setReport(await analysisApi.importNew(title().trim(), f.name.toLowerCase().endsWith('.qdc') ? 'qdc' : 'qdpx', f));
      props.onImported?.();
    } catch (err) {
      setFailure(`Nothing was imported: ${errorMessage(err)}`);
    } finally {
      setBusy(false);
    }
  };
  return (
    <section class="import-project" aria-labelledby="import-project-h">
      <h2 id="import-project-h">Start a study from a REFI-QDA file</h2>
      <Show when={losses()}>
        <details class="losses">
          <summary>What the standard cannot carry (read before importing)</summary>
          <ul>
            <For each={losses()!.import.qdpx}>{(l) => <li>{l}</li>}</For>
          </ul>
        </details>
      </Show>
      <div class="inline-form">
        <label>
          Title of the new study
          <input value={title()} onInput={(e) => setTitle(e.currentTarget.value)} placeholder="the file's project name" />
        </label>
        <label>
          Project (.qdpx) or codebook (.qdc) file
          <input type="file" accept=".qdpx,.qdc" onChange={(e) => setFile(e.currentTarget.files?.[0])} />
        </label>
        <button type="button" disabled={!file() || busy()} onClick={() => void run()}>{busy() ? 'Importing…' : 'Import into a new study'}</button>
      </div>
      <Show when={failure()}><p class="error" role="alert">{failure()}</p></Show>
      <Show when={report()}>{(r) => <ImportReportView report={r()} link />}</Show>
    </section>
  );
}
