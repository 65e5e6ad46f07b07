/**
 * Each trainee's agreement with the reference, round by round: a line per trainee drawn with
 * Observable Plot (npm `@observablehq/plot`, the app's one chart library), drift points marked with a
 * triangle as well as colour. The table beside it carries the same figures for screen readers, so the
 * SVG is one labelled image. Colours: Okabe & Ito (2008).
 */
import { PlotChart, type Plot } from '../../ui/PlotChart.js';
import type { Progress } from './supervision-api.js';

const PALETTE = ['#0072B2', '#009E73', '#CC79A7', '#E69F00', '#56B4E9', '#D55E00'];

interface Dot {
  trainee: string;
  round: string;
  roundNumber: number;
  value: number;
  drift: boolean;
}

export function ProgressChart(props: { progress: Progress }) {
  const valueCount = () => props.progress.trainees.reduce((n, t) => n + t.points.filter((p) => p.value !== null).length, 0);
  const draw = (Plot: Plot) => {
    const dots: Dot[] = props.progress.trainees.flatMap((t) =>
      t.points.filter((p) => p.value !== null).map((p) => ({ trainee: t.name, round: `Round ${p.roundNumber}`, roundNumber: p.roundNumber, value: p.value!, drift: p.drift })),
    );
    const rounds = [...new Set(dots.sort((a, b) => a.roundNumber - b.roundNumber).map((d) => d.round))];
    return Plot.plot({
      width: 640,
      height: 260,
      marginLeft: 50,
      style: { background: 'transparent', fontSize: '13px', color: '#1f2933' },
      x: { domain: rounds, label: 'round', type: 'point', padding: 0.5 },
      y: { domain: [Math.min(0, ...dots.map((d) => d.value)), 1], label: '↑ agreement with the reference', grid: true },
      color: { domain: props.progress.trainees.map((t) => t.name), range: PALETTE, legend: true },
      marks: [
        Plot.ruleY([0], { stroke: '#8a8170' }),
        Plot.line(dots, { x: 'round', y: 'value', stroke: 'trainee', strokeWidth: 2 }),
        Plot.dot(dots, { x: 'round', y: 'value', fill: 'trainee', r: 5, symbol: (d: Dot) => (d.drift ? 'triangle' : 'circle'), title: (d: Dot) => `${d.trainee}, ${d.round}: ${d.value.toFixed(3)}${d.drift ? ' (drift)' : ''}` }),
      ],
    });
  };
  return <PlotChart draw={draw} label="Agreement with the reference per round" description={`${valueCount()} values; the table that follows lists them.`} testId="progress-chart" />;
}
