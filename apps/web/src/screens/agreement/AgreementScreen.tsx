/**
 * Intercoder agreement, of the whole study or of one round: the pooled figure; per code and per coder
 * pair a table (value, interval, band) and a chart of the same figures; per text a table; and from any
 * code the places behind it. In a reflexive study the server sends no coefficient, and none is shown:
 * the units coded differently are laid side by side as prompts for discussion.
 */
import { For, Show, createResource, createSignal, type JSX } from 'solid-js';
import { countOf } from '../../ui/count-words.js';
import { agreementApi, type AgreementReport, type CoefficientReport, type ReflexiveReport } from '../../api/agreement.js';
import { Loading } from '../../ui/Loading.js';
import { href } from '../../ui/router.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav } from '../study/StudyNav.js';
import { AgreementChart } from './AgreementChart.js';
import { DrillDown, type ServerSegment } from './DrillDown.js';
import { codeRows, formatInterval, formatValue, pairRows, reasonWords, type Row } from './agreement-view.js';

const UNITS: Array<[string, string]> = [['turn', 'Speaker turn'], ['paragraph', 'Paragraph'], ['sentence', 'Sentence'], ['character', 'Character'], ['span', 'Free spans (unitizing)']];
const STATISTICS: Array<[string, string]> = [
  ['krippendorff-alpha', "Krippendorff's alpha"], ['cohen-kappa', "Cohen's kappa"], ['scott-pi', "Scott's pi"],
  ['fleiss-kappa', "Fleiss' kappa"], ['percent-agreement', 'Percent agreement'],
];
export const statisticName = (s: string) => STATISTICS.find(([k]) => k === s)?.[1] ?? (s === 'unitizing-alpha' ? "Krippendorff's unitizing alpha" : s);
export const unitName = (u: string) => UNITS.find(([k]) => k === u)?.[1] ?? u;

export interface AgreementScope {
  /** Fetches the report with the given choices; a round answers over its own unit and statistic. */
  load: (o: { unit?: string; statistic?: string; bootstrap?: number; seed?: number }) => Promise<AgreementReport>;
  /** A round fixes its unit and statistic: no choice is offered. */
  fixed?: boolean;
  keep?: (s: ServerSegment) => boolean;
  linkTo: (textId: string, start: number) => string;
}

export function AgreementView(props: { scope: AgreementScope; heading: JSX.Element }) {
  const [unit, setUnit] = createSignal('turn');
  const [statistic, setStatistic] = createSignal('krippendorff-alpha');
  const [report] = createResource(
    () => (props.scope.fixed ? {} : { unit: unit(), statistic: statistic() }),
    // 1,000 bootstrap replicates with a fixed seed give the interval (alpha only; the server ignores it otherwise)
    (o) => props.scope.load({ ...o, bootstrap: 1000, seed: 1 }),
  );
  return (
    <section class="agreement" aria-labelledby="agreement-h" data-testid="agreement">
      <h2 id="agreement-h">{props.heading}</h2>
      <Show when={!props.scope.fixed}>
        <form class="inline-form" aria-label="What to compare" onSubmit={(e) => e.preventDefault()}>
          <label>Unit of comparison
            <select value={unit()} onChange={(e) => setUnit(e.currentTarget.value)}>
              <For each={UNITS}>{([k, v]) => <option value={k}>{v}</option>}</For>
            </select>
          </label>
          <label>Statistic
            <select value={statistic()} onChange={(e) => setStatistic(e.currentTarget.value)} disabled={unit() === 'span'}>
              <For each={STATISTICS}>{([k, v]) => <option value={k}>{v}</option>}</For>
            </select>
          </label>
        </form>
      </Show>
      <Loading loading={report.loading} error={report.error} what="the agreement figures">
        <Show when={report()}>
          {(r) => (
            <Show when={r().kind === 'coefficients'} fallback={<Differences report={r() as ReflexiveReport} />}>
              <Coefficients report={r() as CoefficientReport} scope={props.scope} />
            </Show>
          )}
        </Show>
      </Loading>
    </section>
  );
}

function Scope(props: { report: AgreementReport }) {
  return (
    <p class="muted" data-testid="agreement-scope">
      {countOf(props.report.coders.length, 'coder')} ({props.report.coders.map((c) => c.name).join(', ')}), {countOf(props.report.texts.length, 'text')},
      unit: {unitName(props.report.unit).toLowerCase()}.
    </p>
  );
}

function Coefficients(props: { report: CoefficientReport; scope: AgreementScope }) {
  const [drill, setDrill] = createSignal<Row | null>(null);
  const codes = () => codeRows(props.report);
  const pairs = () => pairRows(props.report);
  const stat = () => statisticName(props.report.statistic);
  const titles = () => new Map(props.report.texts.map((t) => [t.id, t.title]));
  return (
    <>
      <Scope report={props.report} />
      <p class="pooled" data-testid="pooled">
        Pooled {stat()}: <strong>{formatValue(props.report.pooled.value)}</strong>
        <Show when={props.report.pooled.ci}> (95% interval {formatInterval(props.report.pooled.ci)})</Show>
        <Show when={props.report.pooled.band}> — {props.report.pooled.band}</Show>
        <Show when={props.report.pooled.reason}> — {reasonWords(props.report.pooled.reason)}</Show>
      </p>
      <Show when={props.report.method}><p class="muted method">{props.report.method}</p></Show>
      <BandNote statistic={props.report.statistic} />

      <h3 id="per-code-h">Per code</h3>
      <Show when={codes().some((c) => c.result.value !== null)}>
        <AgreementChart rows={codes()} statistic={props.report.statistic} axis={stat()} label={`${stat()} per code, with 95% intervals`} />
      </Show>
      <FigureTable rows={codes()} what="Code" labelledBy="per-code-h" onDrill={(r) => setDrill(r)} />
      <Show when={drill()} keyed>
        {(row) => (
          <DrillDown
            codeId={row.key}
            codeLabel={row.label}
            coders={props.report.coders}
            texts={props.report.texts}
            keep={props.scope.keep}
            linkTo={props.scope.linkTo}
            onClose={() => setDrill(null)}
          />
        )}
      </Show>

      <h3 id="per-pair-h">Per coder pair</h3>
      <Show when={pairs().some((c) => c.result.value !== null)}>
        <AgreementChart rows={pairs()} statistic={props.report.statistic} axis={stat()} label={`${stat()} per coder pair`} />
      </Show>
      <FigureTable rows={pairs()} what="Coders" labelledBy="per-pair-h" />

      <h3 id="per-text-h">Per text</h3>
      <FigureTable
        rows={props.report.perText.map((t) => ({ key: t.textId, label: titles().get(t.textId) ?? 'a text', result: t.result, weak: false }))}
        what="Text"
        labelledBy="per-text-h"
      />
    </>
  );
}

function BandNote(props: { statistic: string }) {
  return (
    <p class="muted band-note">
      <Show
        when={props.statistic === 'krippendorff-alpha' || props.statistic === 'unitizing-alpha'}
        fallback={props.statistic === 'percent-agreement'
          ? 'Percent agreement has no chance correction and no published bands; below .800 is marked weak (common practice).'
          : 'Bands after Landis & Koch (1977): slight up to .20, fair to .40, moderate to .60, substantial to .80, almost perfect above; .60 or less is marked weak.'}
      >
        Bands after Krippendorff (2004): reliable from .800, tentative from .667, unreliable below; below .800 is marked weak.
      </Show>
    </p>
  );
}

function FigureTable(props: { rows: Row[]; what: string; labelledBy: string; onDrill?: (r: Row) => void }) {
  return (
    <table class="figures" aria-labelledby={props.labelledBy}>
      <thead>
        <tr>
          <th scope="col">{props.what}</th>
          <th scope="col">Value</th>
          <th scope="col">95% interval</th>
          <th scope="col">Band</th>
          <Show when={props.onDrill}><th scope="col"><span class="sr-only">Places</span></th></Show>
        </tr>
      </thead>
      <tbody>
        <For each={props.rows} fallback={<tr><td colSpan={5}>Nothing to compare yet.</td></tr>}>
          {(r) => (
            <tr classList={{ weak: r.weak }}>
              <th scope="row">{r.label}</th>
              <td class="num">{formatValue(r.result.value)}<Show when={r.result.reason}><span class="muted"> ({reasonWords(r.result.reason)})</span></Show></td>
              <td class="num">{formatInterval(r.result.ci)}</td>
              <td>{r.result.band ?? '—'}<Show when={r.weak}> <strong class="weak-mark">weak</strong></Show></td>
              <Show when={props.onDrill}>
                <td><button type="button" class="quiet" onClick={() => props.onDrill!(r)} aria-label={`Show places behind “${r.label}”`}>Show places</button></td>
              </Show>
            </tr>
          )}
        </For>
      </tbody>
    </table>
  );
}

/** Reflexive mode: no coefficient; each unit coded differently, with every coder's codes side by side. */
function Differences(props: { report: ReflexiveReport }) {
  const label = () => new Map(props.report.codes.map((c) => [c.id, c.label]));
  const title = () => new Map(props.report.texts.map((t) => [t.id, t.title]));
  return (
    <>
      <Scope report={props.report} />
      <p data-testid="reflexive-note">{props.report.note}</p>
      <table class="differences" aria-label="Units coded differently, side by side">
        <thead>
          <tr>
            <th scope="col">Text</th>
            <th scope="col">Words</th>
            <For each={props.report.coders}>{(c) => <th scope="col">{c.name}</th>}</For>
          </tr>
        </thead>
        <tbody>
          <For each={props.report.differences} fallback={<tr><td colSpan={2 + props.report.coders.length}>Every unit was coded alike.</td></tr>}>
            {(d) => (
              <tr>
                <td>{title().get(d.textId) ?? ''}</td>
                <td><q>{d.quote.length > 200 ? d.quote.slice(0, 200) + '…' : d.quote}</q></td>
                <For each={props.report.coders}>
                  {(c) => {
                    const codes = d.byCoder.find((b) => b.coderId === c.id)?.codeIds ?? [];
                    return <td>{codes.length ? codes.map((id) => label().get(id) ?? id).join(', ') : <span class="muted">no code</span>}</td>;
                  }}
                </For>
              </tr>
            )}
          </For>
        </tbody>
      </table>
    </>
  );
}

/** The study-wide agreement screen (owner, lead, observer; the server refuses others and says why). */
export function StudyAgreementScreen(props: { studyId: string; scope: StudyScope }) {
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="agreement" />
      <p class="muted">
        These figures compare the study's current coding, done while coders could see each other's layers: it is not
        independent coding. Only a round's independent phase yields figures fit to report (see Rounds).
      </p>
      <AgreementView
        heading="Agreement over the study's current coding"
        scope={{ load: (o) => agreementApi.study(props.studyId, o), linkTo: (textId) => href({ name: 'coding', studyId: props.studyId, textId }) }}
      />
    </main>
  );
}
