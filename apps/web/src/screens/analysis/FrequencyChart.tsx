/**
 * Code frequencies as horizontal bars (ui/PlotChart, Observable Plot). Bars take each code's colour and are
 * named by their label with the count at their end; the table below carries the same numbers for screen
 * readers, so the SVG is one labelled image.
 */
import { PlotChart, type Plot } from '../../ui/PlotChart.js';

export function FrequencyChart(props: { labels: string[]; values: number[]; colours: string[]; caption: string }) {
  const draw = (Plot: Plot) => {
    // keyed by position: two codes may share a label (a codebook imported twice), and Plot would stack them on one band
    const rows = props.labels.map((label, i) => ({ key: String(i), label, value: props.values[i] ?? 0, colour: props.colours[i] ?? '#0b6e6e' }));
    const labelOf = (key: string) => rows[Number(key)]?.label ?? '';
    return Plot.plot({
      width: 640,
      height: Math.max(80, 28 * rows.length + 50),
      marginLeft: 220,
      marginRight: 40, // room for the count after the longest bar
      style: { background: 'transparent', fontSize: '13px', color: '#1f2933' },
      x: { label: 'segments →', grid: true, tickFormat: (d: number) => (Number.isInteger(d) ? String(d) : '') },
      y: { domain: rows.map((r) => r.key), label: null, tickFormat: (k: string) => (labelOf(k).length > 30 ? labelOf(k).slice(0, 29) + '…' : labelOf(k)) },
      marks: [Plot.barX(rows, { x: 'value', y: 'key', fill: (r: { colour: string }) => r.colour, title: (r: { label: string; value: number }) => `${r.label}: ${r.value}` }),
        // The count at each bar's end: the bars are read by their label and number, never by colour alone.
        Plot.text(rows, { x: 'value', y: 'key', text: (r: { value: number }) => String(r.value), dx: 4, textAnchor: 'start', fill: 'currentColor' }),
        Plot.ruleX([0]),
      ],
    });
  };
  // The image's name carries the figures themselves (a short list: one bar per code).
  const label = () => `${props.caption}: ${props.labels.map((l, i) => `${l} ${props.values[i] ?? 0}`).join(', ')}`;
  return <PlotChart caption={props.caption} draw={draw} label={label()} testId="frequency-chart" />;
}
