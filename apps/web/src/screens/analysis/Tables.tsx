/**
 * The tables: code frequencies (with a chart), co-occurrence (overlapping words or the same speaker
 * turn), code by attribute (counting cases by default, segments on request) and case by code. Each is
 * an HTML table with a heatmap shading; any non-empty cell opens the segments behind it.
 */
import { createResource, createSignal, For, Show } from 'solid-js';
import { analysisApi, type TableOut } from '../../api/analysis.js';
import { errorMessage } from '../../api/errors.js';
import { FrequencyChart } from './FrequencyChart.js';
import { SourceAndRound, type Filters } from './Retrieve.js';

type Kind = TableOut['kind'];

export function Tables(props: { studyId: string; onDrill: (f: Filters) => void; changes?: number }) {
  const [kind, setKind] = createSignal<Kind>('frequency');
  const [mode, setMode] = createSignal<'overlap' | 'unit'>('overlap');
  const [count, setCount] = createSignal<'cases' | 'segments'>('cases');
  const [attribute, setAttribute] = createSignal('');
  const [layers, setLayers] = createSignal<Pick<Filters, 'source' | 'round'>>({});
  const [table] = createResource(
    () => ({ id: props.studyId, kind: kind(), mode: mode(), count: count(), attribute: attribute(), source: layers().source, round: layers().round, changes: props.changes }),
    ({ changes: _changes, ...q }) => (q.kind === 'code-by-attribute' && !q.attribute ? analysisApi.table(q.id, { kind: 'frequency', source: q.source, round: q.round }) : analysisApi.table(q.id, q)),
  );
  const ready = () => {
    const t = table();
    return t && t.kind === kind() ? t : undefined;
  };
  const max = (t: TableOut) => Math.max(1, ...t.cells.flatMap((r, i) => r.filter((_, j) => t.kind !== 'cooccurrence' || i !== j)));
  const shade = (v: number, t: TableOut) => (v === 0 ? undefined : `rgba(11, 110, 110, ${(0.08 + 0.6 * (v / max(t))).toFixed(2)})`);

  const drill = (t: TableOut, i: number, j: number) => {
    const r = t.rows[i]!;
    const c = t.cols[j]!;
    // the words behind a cell come from the same layers the table counted
    const onDrill = (f: Filters) => props.onDrill({ ...layers(), ...f });
    switch (t.kind) {
      case 'frequency':
        return onDrill({ code: r.id, origin: `Segments of ${r.label}` });
      case 'cooccurrence':
        return onDrill(i === j ? { code: r.id, origin: `Segments of ${r.label}` } : { code: r.id, with: c.id, mode: mode(), origin: 'From the co-occurrence table:' });
      case 'code-by-attribute': {
        const a = t.attributes.find((x) => x.id === t.attribute);
        return onDrill({ code: r.id, attribute: t.attribute!, value: c.id, origin: `Segments of ${r.label} in cases whose ${a?.name ?? 'attribute'} is ${c.label}` });
      }
      case 'case-by-code':
        return onDrill({ code: c.id, case: r.id, origin: `Segments of ${c.label} in the texts of ${r.label}` });
    }
  };

  return (
    <div class="tables">
      <form class="filters" aria-label="Table" onSubmit={(e) => e.preventDefault()}>
        <label>
          Table
          <select value={kind()} onChange={(e) => setKind(e.currentTarget.value as Kind)}>
            <option value="frequency">Code frequencies</option>
            <option value="cooccurrence">Code co-occurrence</option>
            <option value="code-by-attribute">Code by attribute</option>
            <option value="case-by-code">Case by code</option>
          </select>
        </label>
        <SourceAndRound filters={layers()} rounds={table()?.rounds ?? []} onChange={(patch) => setLayers({ ...layers(), ...patch })} />
        <Show when={kind() === 'cooccurrence'}>
          <label>
            Co-occurring when
            <select value={mode()} onChange={(e) => setMode(e.currentTarget.value as 'overlap' | 'unit')}>
              <option value="overlap">their words overlap</option>
              <option value="unit">in the same speaker turn</option>
            </select>
          </label>
        </Show>
        <Show when={kind() === 'code-by-attribute'}>
          <label>
            Attribute
            <select value={attribute()} onChange={(e) => setAttribute(e.currentTarget.value)}>
              <option value="">choose…</option>
              <For each={table()?.attributes ?? []}>{(a) => <option value={a.id} selected={a.id === attribute()}>{a.name}</option>}</For>
            </select>
          </label>
          <label>
            Count
            <select value={count()} onChange={(e) => setCount(e.currentTarget.value as 'cases' | 'segments')}>
              <option value="cases">cases (participants)</option>
              <option value="segments">segments</option>
            </select>
          </label>
        </Show>
      </form>
      <Show when={!table.error} fallback={<p class="error" role="alert">Could not build the table: {errorMessage(table.error)}</p>}>
        <Show when={ready()} fallback={<p class="progress">{kind() === 'code-by-attribute' && !attribute() ? 'Choose an attribute to count by.' : 'Counting…'}</p>}>
          {(t) => (
            <>
              <p class="caution" role="note">{t().caution}</p>
              <Show when={t().kind === 'frequency' && t().rows.length > 0}>
                <FrequencyChart caption="Segments per code" labels={t().rows.map((r) => r.label)} values={t().cells.map((c) => c[0]!)} colours={t().rows.map((r) => r.colour ?? '#0b6e6e')} />
              </Show>
              <div class="table-wrap">
                <table class="matrix">
                  <caption>
                    {t().kind === 'frequency'
                      ? 'Code frequencies'
                      : t().kind === 'cooccurrence'
                        ? `Co-occurrence (${mode() === 'unit' ? 'same speaker turn' : 'overlapping words'}); the diagonal counts each code alone`
                        : t().kind === 'code-by-attribute'
                          ? `Codes by ${t().attributes.find((a) => a.id === t().attribute)?.name ?? 'attribute'}, counting ${t().count === 'segments' ? 'segments' : 'cases (participants) with at least one segment'}`
                          : 'Segments per code in each case’s texts'}
                    . Choose a number to read the segments behind it.
                  </caption>
                  <thead>
                    <tr>
                      <th scope="col">{t().kind === 'case-by-code' ? 'Case' : 'Code'}</th>
                      <For each={t().cols}>{(c) => <th scope="col">{c.label}{c.cases !== undefined ? <span class="muted"> (n = {c.cases})</span> : null}</th>}</For>
                    </tr>
                  </thead>
                  <tbody>
                    <For each={t().rows}>
                      {(r, i) => (
                        <tr>
                          <th scope="row">{r.colour ? <span class="swatch" style={{ background: r.colour }} /> : null} {r.label}</th>
                          <For each={t().cols}>
                            {(c, j) => {
                              const v = () => t().cells[i()]![j()]!;
                              return (
                                <td class="num" style={{ background: shade(v(), t()) }}>
                                  <Show when={v() > 0 && !(t().kind === 'frequency' && j() > 0)} fallback={v()}>
                                    <button type="button" class="cell" aria-label={`${v()}: ${r.label}, ${c.label} — read the segments`} onClick={() => drill(t(), i(), j())}>{v()}</button>
                                  </Show>
                                </td>
                              );
                            }}
                          </For>
                        </tr>
                      )}
                    </For>
                  </tbody>
                </table>
              </div>
            </>
          )}
        </Show>
      </Show>
    </div>
  );
}
