/**
 * The places behind one code: for each text of the report, the stretches where the compared coders
 * applied the code, and who did not. Read from the server's resolved segments of each text.
 */
import { For, Show, createResource } from 'solid-js';
import { call, enc } from '../../api/client.js';
import { toList } from '../../api/normalise.js';
import { Loading } from '../../ui/Loading.js';
import { placesOfCode, type SegmentLike } from './agreement-view.js';

export type ServerSegment = SegmentLike & { round?: string | null; layerKind?: string };

export function DrillDown(props: {
  codeId: string;
  codeLabel: string;
  coders: Array<{ id: string; name: string }>;
  texts: Array<{ id: string; title: string }>;
  /** Keeps only the segments that belong to what the report compared (say, one round's layers). */
  keep?: (s: ServerSegment) => boolean;
  linkTo: (textId: string, start: number) => string;
  onClose: () => void;
}) {
  const [places] = createResource(
    () => props.codeId,
    async (codeId) => {
      const ids = props.coders.map((c) => c.id);
      return Promise.all(props.texts.map(async (t) => {
        const segs = toList(await call('GET', `/api/texts/${enc(t.id)}/segments`), (x) => x as ServerSegment, 'segments');
        return { text: t, places: placesOfCode(segs.filter((s) => props.keep?.(s) ?? true), codeId, ids) };
      }));
    },
  );
  const name = (id: string) => props.coders.find((c) => c.id === id)?.name || 'a coder';
  return (
    <section class="drill" aria-labelledby="drill-h" data-testid="drill-down">
      <div class="row">
        <h3 id="drill-h">Where “{props.codeLabel}” was applied</h3>
        <button type="button" class="quiet" onClick={() => props.onClose()}>Close</button>
      </div>
      <p class="muted">Places some coders left out come first: they are what pulls the figure down.</p>
      <Loading loading={places.loading} error={places.error} what="the segments behind this code">
        <For each={places()}>
          {(t) => (
            <Show when={t.places.length > 0}>
              <h4>{t.text.title}</h4>
              <ol class="places">
                <For each={t.places}>
                  {(p) => (
                    <li classList={{ split: p.without.length > 0 }}>
                      <q>{p.quote.length > 240 ? p.quote.slice(0, 240) + '…' : p.quote}</q>
                      <span class="muted"> — applied by {p.by.map(name).join(', ')}</span>
                      <Show when={p.without.length > 0}><strong> · not by {p.without.map(name).join(', ')}</strong></Show>
                      {' '}<a href={props.linkTo(t.text.id, p.start)}>Open at this place</a>
                    </li>
                  )}
                </For>
              </ol>
            </Show>
          )}
        </For>
        <Show when={places()?.every((t) => t.places.length === 0)}><p>No segment of this code in these texts.</p></Show>
      </Loading>
    </section>
  );
}
