/**
 * A dot chart of one coefficient per row (code or coder pair) with its bootstrap interval as a line and
 * the statistic's band thresholds as dashed rules. Drawn with Observable Plot (SVG, npm
 * `@observablehq/plot`); the table beside it carries the same figures for screen readers, so the SVG is
 * one labelled image. Colours: Okabe & Ito (2008) blue and vermillion; weak rows are also triangles, so
 * colour is never the only cue. Drawn by ui/PlotChart.
 */
import { PlotChart, type Plot } from '../../ui/PlotChart.js';
import { formatValue, thresholds, type Row } from './agreement-view.js';

const OK = '#0072B2';
const WEAK = '#D55E00';

export function AgreementChart(props: { rows: Row[]; statistic: string; axis: string; label: string }) {
  const shown = () => props.rows.filter((r) => r.result.value !== null);
  const draw = (Plot: Plot) => {
    const rows = shown();
    const lo = Math.min(0, ...rows.map((r) => r.result.ci?.[0] ?? r.result.value!));
    return Plot.plot({
      width: 640,
      height: Math.max(80, 34 * rows.length + 50),
      marginLeft: 260,
      style: { background: 'transparent', fontSize: '13px', color: '#1f2933' },
      x: { domain: [lo, 1], label: `${props.axis} →`, grid: false },
      y: { domain: rows.map((r) => r.label), label: null, tickFormat: (d: string) => (d.length > 34 ? d.slice(0, 33) + '…' : d) },
      marks: [
        Plot.ruleX(thresholds(props.statistic), { stroke: '#52606d', strokeDasharray: '4,3' }),
        Plot.ruleX([0], { stroke: '#8a8170' }),
        Plot.link(rows.filter((r) => r.result.ci), {
          x1: (r: Row) => r.result.ci![0],
          x2: (r: Row) => r.result.ci![1],
          y1: 'label',
          y2: 'label',
          stroke: (r: Row) => (r.weak ? WEAK : OK),
          strokeWidth: 2,
        }),
        Plot.dot(rows, {
          x: (r: Row) => r.result.value,
          y: 'label',
          r: 5,
          fill: (r: Row) => (r.weak ? WEAK : OK),
          symbol: (r: Row) => (r.weak ? 'triangle' : 'circle'),
          title: (r: Row) => `${r.label}: ${formatValue(r.result.value)}`,
        }),
      ],
    });
  };
  return <PlotChart draw={draw} label={props.label} description={`${shown().length} values; the table that follows lists them.`} testId="agreement-chart" />;
}
