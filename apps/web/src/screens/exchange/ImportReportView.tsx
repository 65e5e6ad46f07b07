/** What an import brought in, how end positions were read, and every warning. */
import { countOf } from '../../ui/count-words.js';
import { For, Show } from 'solid-js';
import type { ImportReport } from '../../api/analysis.js';
import { href } from '../../ui/router.js';

export function ImportReportView(props: { report: ImportReport; link?: boolean }) {
  const r = () => props.report;
  return (
    <div class="import-report" role="status">
      <p>
        Imported {countOf(r().texts, 'text')}, {countOf(r().codes, 'code')}, {countOf(r().segments, 'segment')}, {countOf(r().memos, 'memo')} and {countOf(r().cases, 'case')}. End positions were read{' '}
        {r().endReading === 'exclusive' ? 'as exclusive (end − start = length)' : 'as inclusive (the last character)'}.
        <Show when={props.link}>{' '}<a href={href({ name: 'study', studyId: r().studyId })}>Open the new study</a>.</Show>
      </p>
      <Show when={r().coders.some((c) => c.account === 'created')}>
        <p>Accounts made for coders without one (they cannot sign in until given a password): {r().coders.filter((c) => c.account === 'created').map((c) => c.name).join(', ')}.</p>
      </Show>
      <Show when={r().warnings.length}>
        <ul class="warnings">
          <For each={r().warnings}>{(w) => <li>{w}</li>}</For>
        </ul>
      </Show>
    </div>
  );
}
