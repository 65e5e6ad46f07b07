/**
 * Code frequencies as a horizontal bar chart (Chart.js, canvas). The canvas is described for screen
 * readers and the same numbers are in the table beside it, which stays the accessible form.
 */
import { BarController, BarElement, CategoryScale, Chart, LinearScale, Tooltip } from 'chart.js';
import { createEffect, onCleanup } from 'solid-js';

Chart.register(BarController, BarElement, CategoryScale, LinearScale, Tooltip);

export function FrequencyChart(props: { labels: string[]; values: number[]; colours: string[]; caption: string }) {
  let canvas!: HTMLCanvasElement;
  let chart: Chart | undefined;
  createEffect(() => {
    const data = { labels: props.labels, datasets: [{ label: 'Segments', data: props.values, backgroundColor: props.colours, borderWidth: 0 }] };
    if (!chart) {
      chart = new Chart(canvas, {
        type: 'bar',
        data,
        options: { indexAxis: 'y', animation: false, responsive: true, maintainAspectRatio: false, plugins: { tooltip: { enabled: true } }, scales: { x: { beginAtZero: true, ticks: { precision: 0 } } } },
      });
    } else {
      chart.data = data;
      chart.update();
    }
  });
  onCleanup(() => chart?.destroy());
  return (
    <figure class="chart" style={{ height: `${Math.max(120, 28 * props.labels.length + 40)}px` }}>
      <canvas ref={canvas} role="img" aria-label={`${props.caption}: ${props.labels.map((l, i) => `${l} ${props.values[i]}`).join(', ')}`} />
      <figcaption class="sr-only">{props.caption}</figcaption>
    </figure>
  );
}
