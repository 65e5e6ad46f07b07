/**
 * The round report as a page (the server's Markdown, shown as text, not as HTML: it quotes interview
 * words and names coders, and nothing of it is run as markup) with Markdown and CSV downloads.
 */
import { Show, createResource } from 'solid-js';
import { roundsApi } from '../../api/rounds.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { Loading } from '../../ui/Loading.js';
import { href } from '../../ui/router.js';
import { useRound } from './round-data.js';

export function RoundReport(props: { studyId: string; roundId: string; scope: StudyScope }) {
  const { round } = useRound(() => props.roundId);
  const [report] = createResource(() => props.roundId, (id) => roundsApi.report(id));
  const file = (ext: string) => `${(round()?.name ?? 'round').replace(/[^\p{L}\p{N}]+/gu, '-').replace(/^-|-$/g, '').toLowerCase() || 'round'}-report.${ext}`;
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="rounds" />
      <p class="crumbs">
        <a href={href({ name: 'rounds', studyId: props.studyId })}>Rounds</a> /{' '}
        <a href={href({ name: 'round', studyId: props.studyId, roundId: props.roundId })}>{round()?.name ?? 'Round'}</a> /
      </p>
      <h2 id="report-h">Round report</h2>
      <p class="data-notice" role="note">
        <strong>Before you share it:</strong> the report names the coders and may quote interview words. Share it only as your
        ethics approval and consent terms allow.
      </p>
      <p class="row">
        <a class="button" href={roundsApi.reportUrl(props.roundId, 'md')} download={file('md')} data-testid="download-md">Download Markdown</a>
        <a class="button" href={roundsApi.reportUrl(props.roundId, 'csv')} download={file('csv')} data-testid="download-csv">Download CSV</a>
      </p>
      <Loading loading={report.loading} error={report.error} what="the round report">
        <Show when={report()}>
          {(md) => <pre class="report" aria-labelledby="report-h" tabindex="0" data-testid="round-report">{md()}</pre>}
        </Show>
      </Loading>
    </main>
  );
}
