/**
 * Code frequencies as horizontal bars, drawn with Observable Plot (SVG, npm `@observablehq/plot`, the
 * app's one chart library; loaded in its own chunk when a chart is first drawn). Bars take each code's
 * colour; the table below carries the same numbers for screen readers, so the SVG is one labelled image.
 */
import { Show, createEffect, createResource, onCleanup } from 'solid-js';

export function FrequencyChart(props: { labels: string[]; values: number[]; colours: string[]; caption: string }) {
  let host!: HTMLDivElement;
  const [plot] = createResource(() => import('@observablehq/plot'));
  createEffect(() => {
    const Plot = plot();
    if (!Plot) return;
    // keyed by position: two codes may share a label (a codebook imported twice), and Plot would stack them on one band
    const rows = props.labels.map((label, i) => ({ key: String(i), label, value: props.values[i] ?? 0, colour: props.colours[i] ?? '#0b6e6e' }));
    const labelOf = (key: string) => rows[Number(key)]?.label ?? '';
    const chart = Plot.plot({
      width: 640,
      height: Math.max(80, 28 * rows.length + 50),
      marginLeft: 220,
      ariaLabel: `${props.caption}: ${rows.map((r) => `${r.label} ${r.value}`).join(', ')}`,
      style: { background: 'transparent', fontSize: '13px', color: '#1f2933' },
      x: { label: 'segments →', grid: true, tickFormat: (d: number) => (Number.isInteger(d) ? String(d) : '') },
      y: { domain: rows.map((r) => r.key), label: null, tickFormat: (k: string) => (labelOf(k).length > 30 ? labelOf(k).slice(0, 29) + '…' : labelOf(k)) },
      marks: [Plot.barX(rows, { x: 'value', y: 'key', fill: (r: { colour: string }) => r.colour, title: (r: { label: string; value: number }) => `${r.label}: ${r.value}` }), Plot.ruleX([0])],
    });
    // one labelled image: Plot labels its inner groups too, which ARIA forbids on elements without a role
    chart.setAttribute('role', 'img');
    chart.querySelectorAll('[aria-label], [aria-description]').forEach((el) => {
      el.removeAttribute('aria-label');
      el.removeAttribute('aria-description');
    });
    host.replaceChildren(chart);
    onCleanup(() => chart.remove());
  });
  return (
    <>
      <Show when={plot.error}><p class="error" role="alert">The chart could not be drawn: {String(plot.error)}. The table below has the same figures.</p></Show>
      <figure class="chart" aria-label={props.caption} ref={host} data-testid="frequency-chart" />
    </>
  );
}
