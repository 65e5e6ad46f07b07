/**
 * The two layers side by side, place by place in text order: what the reference coded at each place
 * the comparison found, and what the reviewed layer coded there. Each row links to its place in the
 * lists below (with its comments) and back.
 */
import { For, Show } from 'solid-js';
import type { Category, Comparison, ComparisonEntry } from './review-api.js';

export const CATEGORY_TITLES: Record<Category, string> = { missed: 'Missed', extra: 'Extra', otherCode: 'Other code', otherBoundary: 'Other boundary' };

/** The id of a place's item in the lists (the side-by-side rows link to it). */
export const placeId = (category: Category, index: number) => `place-${category}-${index}`;

interface Row {
  category: Category;
  index: number;
  entry: ComparisonEntry;
}

export function placesInOrder(r: Comparison): Row[] {
  const rows: Row[] = [];
  for (const category of ['missed', 'extra', 'otherCode', 'otherBoundary'] as const) r[category].forEach((entry, index) => rows.push({ category, index, entry }));
  return rows.sort((a, b) => a.entry.start - b.entry.start || a.entry.end - b.entry.end);
}

export function SideBySide(props: { result: Comparison; layerName: string; referenceName: string; label: (id: string) => string }) {
  const rows = () => placesInOrder(props.result);
  const same = () => Object.values(props.result.counts).reduce((n, c) => n + c.matched, 0);
  return (
    <section class="side-by-side" aria-labelledby="sbs-h">
      <h3 id="sbs-h">Side by side</h3>
      <p class="muted">Every place where the two layers differ, in the order of the text. {same()} reference segment{same() === 1 ? '' : 's'} coded the same way in both are not repeated here.</p>
      <table class="sbs">
        <thead>
          <tr><th scope="col">Place</th><th scope="col">{props.referenceName}</th><th scope="col">{props.layerName}</th></tr>
        </thead>
        <tbody>
          <For each={rows()} fallback={<tr><td colSpan={3}>The layers do not differ.</td></tr>}>
            {(row) => (
              <tr data-category={row.category} id={`sbs-${placeId(row.category, row.index)}`}>
                <th scope="row"><a href={`#${placeId(row.category, row.index)}`} onClick={(e) => { e.preventDefault(); jump(placeId(row.category, row.index)); }}>{CATEGORY_TITLES[row.category]}</a></th>
                <td>
                  <Show when={row.entry.reference} fallback={<span class="muted">nothing</span>}>
                    {(s) => <><span class="code-chip">{props.label(s().codeId)}</span> <q>{s().quote}</q></>}
                  </Show>
                </td>
                <td>
                  <For each={row.entry.layer} fallback={<span class="muted">nothing</span>}>
                    {(s) => <p><span class="code-chip">{props.label(s.codeId)}</span> <q>{s.quote}</q></p>}
                  </For>
                </td>
              </tr>
            )}
          </For>
        </tbody>
      </table>
    </section>
  );
}

/** Scrolls to an element and moves focus there (the hash stays the route's). */
export function jump(id: string): void {
  const el = document.getElementById(id);
  if (!el) return;
  el.scrollIntoView({ block: 'center' });
  if (!el.hasAttribute('tabindex')) el.setAttribute('tabindex', '-1');
  el.focus();
}
