/**
 * Exports (owner and lead) and REFI-QDA imports into this study, with the data-protection caution
 * beside the exports and, before each REFI-QDA export or import, what the standard cannot carry.
 */
import { createResource, createSignal, For, Show } from 'solid-js';
import { analysisApi, type ImportReport } from '../../api/analysis.js';
import { errorMessage } from '../../api/errors.js';
import type { StudyScope } from '../study/study-context.js';
import { ImportReportView } from './ImportReportView.js';

const FORMATS = [
  { id: 'csv', label: 'Segments (CSV)', about: 'One row per segment: code path, coder, text, offsets in code points and UTF-16 units, the quoted words, speaker, time, and the attributes of the text’s cases.' },
  { id: 'csv-consensus', label: 'Consensus of rounds (CSV)', about: 'The same columns for the consensus layers of calibration rounds that are revealed or closed; the coder reads “Consensus, round N”.' },
  { id: 'codebook-md', label: 'Codebook (Markdown)', about: 'Every field of every entry, with examples, near-misses and its history.' },
  { id: 'codebook-csv', label: 'Codebook (CSV)', about: 'The same, one row per code.' },
  { id: 'memos-md', label: 'Memos and jottings (Markdown)', about: 'With author, dates and what each is attached to.' },
  { id: 'qdc', label: 'Codebook for other programs (REFI-QDA .qdc)', about: 'The exchange standard’s codebook file.' },
  { id: 'qdpx', label: 'Whole project for other programs (REFI-QDA .qdpx)', about: 'Texts, codes, segments per coder, memos, cases and attributes.' },
] as const;

export function Exchange(props: { studyId: string; scope: StudyScope }) {
  const [losses] = createResource(() => analysisApi.losses());
  const permissions = () => ((props.scope.study()?.permissions as string[] | undefined) ?? []);
  const mayExport = () => permissions().includes('export');
  const mayImport = () => permissions().includes('codebook.write') && permissions().includes('text.import');
  const [busy, setBusy] = createSignal<string>();
  const [received, setReceived] = createSignal(0);
  const [done, setDone] = createSignal<string>();
  const [failure, setFailure] = createSignal<string>();

  const download = async (format: string) => {
    setBusy(format);
    setReceived(0);
    setDone();
    setFailure();
    try {
      const { blob, filename } = await (format === 'csv-consensus' ? analysisApi.download(props.studyId, 'csv', setReceived, 'consensus') : analysisApi.download(props.studyId, format, setReceived));
      const url = URL.createObjectURL(blob);
      const a = document.createElement('a');
      a.href = url;
      a.download = filename;
      document.body.append(a);
      a.click();
      a.remove();
      setTimeout(() => URL.revokeObjectURL(url), 60_000);
      setDone(`${filename} saved (${kb(blob.size)}). It is in the study’s audit log.`);
    } catch (err) {
      setFailure(`The export failed: ${errorMessage(err)}`);
    } finally {
      setBusy();
    }
  };

  const [file, setFile] = createSignal<File>();
  const [report, setReport] = createSignal<ImportReport>();
  const [importError, setImportError] = createSignal<string>();
  const [importing, setImporting] = createSignal(false);
  const format = () => (file()?.name.toLowerCase().endsWith('.qdc') ? 'qdc' : 'qdpx');
  const runImport = async () => {
    const f = file();
    if (!f) return;
    setImporting(true);
    setReport();
    setImportError();
    try {
      setReport(await analysisApi.importInto(props.studyId, format(), f));
    } catch (err) {
      setImportError(`Nothing was imported: ${errorMessage(err)}`);
    } finally {
      setImporting(false);
    }
  };

  return (
    <div class="exchange">
      <section aria-labelledby="export-h">
        <h2 id="export-h">Export</h2>
        <aside class="data-notice" aria-label="Before you export">
          <strong>Exports carry personal data.</strong> They hold the participants’ words, the coders’ names (and, in a .qdpx file, their emails) and
          memos that may name people. Export only what your ethics approval and consent terms allow, keep the files where your institution approves,
          and delete them when the study’s retention date passes. Every export is written to the study’s audit log.
        </aside>
        <Show when={mayExport()} fallback={<p class="muted" role="note">Exports are for the study’s owners and leads; your role does not include them.</p>}>
          <ul class="formats">
            <For each={FORMATS}>
              {(f) => (
                <li>
                  <button type="button" disabled={busy() !== undefined} onClick={() => void download(f.id)}>{f.label}</button>
                  <span class="muted"> {f.about}</span>
                  <Show when={(f.id === 'qdc' || f.id === 'qdpx') && losses()}>
                    <details class="losses">
                      <summary>What the standard cannot carry</summary>
                      <ul>
                        <For each={losses()!.export[f.id as 'qdc' | 'qdpx']}>{(l) => <li>{l}</li>}</For>
                      </ul>
                    </details>
                  </Show>
                </li>
              )}
            </For>
          </ul>
          <p aria-live="polite" class="status-line">
            <Show when={busy()}>Exporting… {kb(received())} received</Show>
            <Show when={done()}>{done()}</Show>
          </p>
          <Show when={failure()}><p class="error" role="alert">{failure()}</p></Show>
        </Show>
      </section>
      <section aria-labelledby="import-h">
        <h2 id="import-h">Import a REFI-QDA file into this study</h2>
        <Show when={mayImport()} fallback={<p class="muted" role="note">Imports are for the study’s owners and leads; your role does not include them.</p>}>
          <Show when={losses()}>
            <div class="losses-now" role="note" aria-label="What the standard cannot carry">
              <p>Before you import, what the standard cannot carry:</p>
              <ul>
                <For each={losses()!.import.qdpx}>{(l) => <li>{l}</li>}</For>
              </ul>
            </div>
          </Show>
          <div class="inline-form">
            <label>
              Codebook (.qdc) or project (.qdpx) file
              <input type="file" accept=".qdc,.qdpx" onChange={(e) => setFile(e.currentTarget.files?.[0])} />
            </label>
            <button type="button" disabled={!file() || importing()} onClick={() => void runImport()}>{importing() ? 'Importing…' : 'Import'}</button>
          </div>
          <Show when={importError()}><p class="error" role="alert">{importError()}</p></Show>
          <Show when={report()}>{(r) => <ImportReportView report={r()} />}</Show>
        </Show>
      </section>
    </div>
  );
}

export function kb(n: number): string {
  return n < 1024 ? `${n} bytes` : n < 1024 * 1024 ? `${(n / 1024).toFixed(1)} KB` : `${(n / 1024 / 1024).toFixed(1)} MB`;
}
