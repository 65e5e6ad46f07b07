/**
 * Analysis: retrieval of coded segments across the study, the tables (with heatmaps and drill-down to
 * the words behind any cell) and a chart of code frequencies, and the study's exports and REFI-QDA
 * imports. One screen with three parts; the part and the retrieval filters live in component state.
 */
import { createSignal, Match, onCleanup, Switch } from 'solid-js';
import { watchStudy } from '../../api/study-events.js';
import { DataNotice } from '../../ui/DataNotice.js';
import { StudyNav } from '../study/StudyNav.js';
import type { StudyScope } from '../study/study-context.js';
import { Exchange } from '../exchange/Exchange.js';
import { Retrieve, type Filters } from './Retrieve.js';
import { Tables } from './Tables.js';

type Part = 'retrieve' | 'tables' | 'exchange';

export function AnalysisScreen(props: { studyId: string; scope: StudyScope }) {
  const [part, setPart] = createSignal<Part>('retrieve');
  const [filters, setFilters] = createSignal<Filters>({});
  // an import into this study (by anyone, on any node) changes every count: read them again
  const [changes, setChanges] = createSignal(0);
  onCleanup(watchStudy(props.studyId, () => setChanges((n) => n + 1)));
  const drill = (f: Filters) => {
    setFilters(f);
    setPart('retrieve');
  };
  const tab = (p: Part, label: string) => (
    <button type="button" role="tab" id={`tab-${p}`} aria-selected={part() === p} aria-controls={`panel-${p}`} class={part() === p ? 'tab on' : 'tab'} onClick={() => setPart(p)}>
      {label}
    </button>
  );
  return (
    <main class="page analysis">
      <StudyNav studyId={props.studyId} scope={props.scope} current="analysis" />
      <div role="tablist" aria-label="Analysis" class="subtabs">
        {tab('retrieve', 'Retrieve segments')}
        {tab('tables', 'Tables and chart')}
        {tab('exchange', 'Export and import')}
      </div>
      <Switch>
        <Match when={part() === 'retrieve'}>
          <section role="tabpanel" id="panel-retrieve" aria-labelledby="tab-retrieve">
            <Retrieve studyId={props.studyId} filters={filters()} onFilters={setFilters} changes={changes()} />
          </section>
        </Match>
        <Match when={part() === 'tables'}>
          <section role="tabpanel" id="panel-tables" aria-labelledby="tab-tables">
            <Tables studyId={props.studyId} onDrill={drill} changes={changes()} />
          </section>
        </Match>
        <Match when={part() === 'exchange'}>
          <section role="tabpanel" id="panel-exchange" aria-labelledby="tab-exchange">
            <Exchange studyId={props.studyId} scope={props.scope} />
          </section>
        </Match>
      </Switch>
      <DataNotice compact />
    </main>
  );
}
