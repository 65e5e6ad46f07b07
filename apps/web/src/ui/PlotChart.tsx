/**
 * A chart drawn with Observable Plot (SVG, npm `@observablehq/plot`, the app's one chart library), shown
 * as one labelled image: the table beside every chart carries the same figures for screen readers.
 * Plot is loaded only when a chart is first drawn (its own chunk), so the coding view does not pay for it.
 * `draw` builds the chart from the loaded library; it runs again whenever the signals it reads change.
 */
import { Show, createEffect, createResource, onCleanup, type JSX } from 'solid-js';

export type Plot = typeof import('@observablehq/plot');

export function PlotChart(props: {
  draw: (plot: Plot) => SVGSVGElement | HTMLElement;
  /** The image's name and its one-line description (both read by screen readers). */
  label: string;
  description?: string;
  testId: string;
  /** Given, the chart is a figure named by this caption (the image inside names the figures too). */
  caption?: string;
}): JSX.Element {
  let host!: HTMLElement;
  const [plot] = createResource(() => import('@observablehq/plot'));
  createEffect(() => {
    const Plot = plot();
    if (!Plot) return;
    const chart = props.draw(Plot);
    // One labelled image. Plot labels its inner groups too, which ARIA forbids on elements without a
    // role; with a legend it wraps the svg in a figure, which then is the image and carries the name.
    chart.setAttribute('role', 'img');
    chart.setAttribute('aria-label', props.label);
    if (props.description) chart.setAttribute('aria-description', props.description);
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
      <Show when={props.caption !== undefined} fallback={<div class="chart" ref={(el) => (host = el)} data-testid={props.testId} />}>
        <figure class="chart" aria-label={props.caption} ref={(el) => (host = el)} data-testid={props.testId} />
      </Show>
    </>
  );
}
