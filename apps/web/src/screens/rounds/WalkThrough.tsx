/**
 * The walk-through of a revealed round on one text: the transcript with every participant's round
 * layer and the consensus layer in the margin; the places where the coders differ, one at a time,
 * each coder's codes side by side; the definitions of the codes in play, which the lead can revise
 * live; and adjudication into the consensus layer. The lead's place is followed by everyone who has
 * not left follow mode (follow.ts).
 */
import { For, Show, createEffect, createMemo, createResource, createSignal, on, onCleanup, untrack } from 'solid-js';
import { addSegment, getDefinitionText, removeSegment } from '@gloss/model';
import type { Awareness } from 'y-protocols/awareness';
import { api } from '../../api/client.js';
import type { LayerInfo, Me, Member } from '../../api/types.js';
import type { Round } from '../../api/rounds.js';
import { openDoc, type OpenDoc } from '../../sync/open-doc.js';
import type { StudyScope } from '../study/study-context.js';
import { Loading } from '../../ui/Loading.js';
import { createAttempt } from '../../ui/attempt.js';
import { go, href } from '../../ui/router.js';
import { CodeSwatch } from '../../ui/CodeSwatch.js';
import { useCodingState, type LayerHandle } from '../coding/coding-state.js';
import { useTextPresence } from '../coding/text-presence.js';
import { Transcript } from '../coding/Transcript.js';
import { rangeFor } from '../coding/dom-selection.js';
import { ordered, type Sel } from '../coding/keyboard-selection.js';
import { DefinitionField } from '../codebook/DefinitionField.js';
import { disagreementPlaces, type Place } from './places.js';
import { decodePlace, encodePlace, useFollow } from './follow.js';
import { leadsRound } from './round-data.js';

const CONSENSUS = 'Consensus';

interface Props { studyId: string; round: Round; textId: string; at?: number; scope: StudyScope; me: Me; members: Member[] }

/** Opens the text and the round's layers, then shows the walk-through once they hold the server's state. */
export function WalkThrough(props: Props) {
  // the round lists its texts' rooms and layers (a closed round's layers are listed nowhere else)
  const [detail] = createResource(() => props.textId, async (id) => {
    const fromRound = untrack(() => props.round.rooms.get(id));
    const d = await api.text(id);
    return fromRound ? { ...d, room: fromRound.room, layers: fromRound.layers } : d;
  });
  const [docs, setDocs] = createSignal<{ text: OpenDoc; layers: Array<LayerHandle & { info: LayerInfo }> }>();
  createEffect(() => {
    const d = detail();
    if (!d) return;
    untrack(() => {
      const nameOf = (id: string) => props.members.find((m) => m.userId === id)?.name ?? 'a coder';
      const text = openDoc(d.room, { label: `“${d.title || 'this text'}”`, gc: false });
      const layers = d.layers
        .filter((l) => l.round === props.round.id)
        .map((l) => {
          const consensus = l.kind === 'consensus';
          const mine = !consensus && (l.mine ?? l.coderId === props.me.id);
          const name = consensus ? CONSENSUS : `${l.name ?? nameOf(l.coderId)}${mine ? ' (you)' : ''}`;
          return { coderId: l.coderId, name, mine, info: l, doc: openDoc(l.room, { label: consensus ? 'the consensus layer' : `${name}'s round layer`, gc: false, offline: l.canWrite === true }) };
        })
        // coders in the round's order, the consensus lane last
        .sort((a, b) => Number(a.info.kind === 'consensus') - Number(b.info.kind === 'consensus') || props.round.participantIds.indexOf(a.coderId) - props.round.participantIds.indexOf(b.coderId));
      props.scope.setWhere(props.textId, d.title);
      let live = true;
      void Promise.all([text.whenReady, ...layers.map((l) => l.doc.whenReady)]).then(() => live && setDocs({ text, layers }));
      onCleanup(() => {
        live = false;
        props.scope.setWhere(undefined, undefined);
        text.release();
        layers.forEach((l) => l.doc.release());
        setDocs(undefined);
      });
    });
  });
  return (
    <Loading loading={detail.loading} error={detail.error} what="this text">
      <h2 class="text-title">{detail()?.title}</h2>
      <Show when={docs() && props.scope.codebook() ? { ...docs()!, codebook: props.scope.codebook()! } : undefined} keyed fallback={<p class="progress">Opening the round's layers…</p>}>
        {(d) => <WalkView {...props} text={d.text} layers={d.layers} codebook={d.codebook} />}
      </Show>
    </Loading>
  );
}

function WalkView(props: Props & { text: OpenDoc; layers: Array<LayerHandle & { info: LayerInfo }>; codebook: OpenDoc }) {
  const all = () => props.layers;
  const state = useCodingState(props.text, props.layers, all, props.codebook, { showDisagreement: () => false });
  const presence = useTextPresence(props.text, props.me);
  const consensus = props.layers.find((l) => l.info.kind === 'consensus');
  const coderLayers = props.layers.filter((l) => l.info.kind !== 'consensus');
  const coders = coderLayers.map((l) => l.coderId);
  const isLead = () => leadsRound(props.round);
  const canAdjudicate = () => !!consensus && consensus.info.canWrite !== false && isLead() && props.round.phase === 'revealed';
  const follow = useFollow(props.scope, () => props.round.id, () => props.round.leadId);
  const { message, attempt } = createAttempt();
  const [notice, setNotice] = createSignal('');

  const places = createMemo<Place[]>(() => {
    const segs = coderLayers.flatMap((l) => state.layerSegments.get(l.coderId)?.() ?? []);
    return disagreementPlaces(segs, coders, props.round.unit === 'turn' ? state.turns() : undefined);
  });
  const [index, setIndex] = createSignal(0);
  const place = () => places()[Math.min(index(), Math.max(0, places().length - 1))];

  const [selection, setSelectionSig] = createSignal<Sel | null>(null);
  const setSelection = (s: Sel | null) => {
    setSelectionSig(s);
    presence.publish(s);
  };
  const [chosen, setChosen] = createSignal<string | null>(null);
  let transcriptEl: HTMLElement | undefined;

  // Show a place: scroll it to the middle of the transcript and mark its words.
  const show = (p: { start: number; end: number } | undefined) => {
    const reg = (globalThis as { CSS?: { highlights?: Map<string, unknown> } }).CSS?.highlights;
    const H = (globalThis as { Highlight?: new (...r: Range[]) => unknown }).Highlight;
    if (!p || !transcriptEl) return;
    const r = rangeFor(transcriptEl, p.start, p.end);
    r?.startContainer.parentElement?.scrollIntoView({ block: 'center' });
    if (reg && H) reg.set('gloss-place', new H(...(r ? [r] : [])));
  };
  onCleanup(() => (globalThis as { CSS?: { highlights?: Map<string, unknown> } }).CSS?.highlights?.delete('gloss-place'));

  // The lead announces every place moved to; leaving the screen ends the announcement.
  const announce = () => {
    const p = place();
    if (!isLead() || !p) return;
    follow.publish({ roundId: props.round.id, textId: props.textId, index: index(), count: places().length, ...encodePlace(props.text.doc, p.start, p.end) });
  };
  onCleanup(() => {
    if (isLead()) follow.publish(null);
  });
  const goTo = (i: number) => {
    setIndex(Math.max(0, Math.min(i, places().length - 1)));
    queueMicrotask(() => show(place()));
    announce();
  };

  // Opened at a given offset (a link from the agreement screen): start at the place that holds it.
  const [ready, setReady] = createSignal(false);
  createEffect(on(ready, (r) => {
    if (!r) return;
    const at = props.at;
    const i = at === undefined ? 0 : places().findIndex((p) => p.start <= at && at < p.end);
    if (isLead()) goTo(Math.max(0, i));
    else if (at !== undefined) show({ start: at, end: at + 1 });
  }));

  // Followers: follow the lead's place, across texts too.
  createEffect(() => {
    const lp = follow.leadPlace();
    if (!lp || isLead() || !follow.following() || !ready()) return;
    if (lp.textId !== props.textId) {
      go({ name: 'round-text', studyId: props.studyId, roundId: props.round.id, textId: lp.textId });
      return;
    }
    const at = decodePlace(props.text.doc, lp);
    if (!at) return;
    const i = untrack(places).findIndex((p) => p.start < at.end && at.start < p.end);
    setIndex(i >= 0 ? i : 0);
    queueMicrotask(() => show(at));
  });

  const codeLabel = (id: string) => state.codeById().get(id)?.label ?? 'a code no longer in the codebook';
  const coderName = (id: string) => props.layers.find((l) => l.coderId === id)?.name ?? 'a coder';
  const segmentsOf = (p: Place, coderId: string) => {
    const ids = new Set(p.byCoder.find((b) => b.coderId === coderId)?.segmentIds ?? []);
    return (state.layerSegments.get(coderId)?.() ?? []).filter((s) => ids.has(s.id));
  };
  const consensusHere = () => {
    const p = place();
    if (!p || !consensus) return [];
    return (state.layerSegments.get(consensus.coderId)?.() ?? []).filter((s) => s.start < p.end && p.start < s.end);
  };
  const codesHere = () => [...new Set(place()?.byCoder.flatMap((b) => b.codeIds) ?? [])];

  // adjudication
  const [taken, setTaken] = createSignal<Set<string>>(new Set());
  const [reason, setReason] = createSignal('');
  const [newCode, setNewCode] = createSignal('');
  createEffect(on(index, () => setTaken(new Set<string>())));
  const take = () => {
    const p = place();
    if (!p || !consensus) return;
    const chosenSegs = p.byCoder.flatMap((b) => segmentsOf(p, b.coderId)).filter((s) => taken().has(s.id));
    if (chosenSegs.length === 0) return setNotice('Tick at least one coder’s segment to take.');
    attempt(() => {
      for (const s of chosenSegs) addSegment(consensus.doc.doc, props.text.doc, { codeId: s.codeId, start: s.start, end: s.end, ...(reason().trim() ? { note: reason().trim() } : {}) });
    });
    setNotice(`${chosenSegs.length === 1 ? 'One segment' : `${chosenSegs.length} segments`} taken into the consensus layer.`);
    setTaken(new Set<string>());
    setReason('');
  };
  const addNew = () => {
    const p = place();
    if (!consensus || !p) return;
    const s = selection();
    const o = s ? ordered(s) : null;
    const range = o && o.end > o.start ? o : { start: p.start, end: p.end };
    if (!newCode()) return setNotice('Choose the code of the new segment.');
    attempt(() => addSegment(consensus.doc.doc, props.text.doc, { codeId: newCode(), start: range.start, end: range.end, ...(reason().trim() ? { note: reason().trim() } : {}) }));
    setNotice(`New consensus segment “${codeLabel(newCode())}” added${o && o.end > o.start ? ' on the selected words' : ' over the whole place'}.`);
    setReason('');
  };

  return (
    <div class="coding walk" data-testid="walk-through" data-ready={ready() ? 'yes' : 'no'}>
      <div class="coding-main">
        <Transcript
          state={state}
          lanes={() => props.layers.map((l) => l.coderId)}
          laneName={coderName}
          selection={selection}
          setSelection={setSelection}
          selectedSegment={chosen}
          selectSegment={(id) => setChosen(id)}
          remote={presence.remote}
          onReady={() => setReady(true)}
          ref={(el) => (transcriptEl = el)}
        />
        <p class="muted lanes-key">Margin, left to right: {props.layers.map((l) => l.name).join(', ')}.</p>
      </div>
      <aside class="coding-side" aria-label="Walk-through">
        <section aria-labelledby="follow-h" class="follow" data-testid="follow">
          <h2 id="follow-h">Walk-through</h2>
          <Show when={!isLead()}>
            <Show
              when={follow.following()}
              fallback={<p>You left follow mode. <button type="button" class="quiet" onClick={() => follow.setFollowing(true)}>Follow the lead again</button></p>}
            >
              <p data-testid="follow-state">
                <Show when={follow.leadPlace()} fallback="Following the lead: waiting for them to start.">
                  {(lp) => <>Following {lp().byName}: place {lp().index + 1} of {lp().count}.</>}
                </Show>{' '}
                <button type="button" class="quiet" onClick={() => follow.setFollowing(false)}>Stop following</button>
              </p>
            </Show>
          </Show>
          <Show when={places().length > 0} fallback={<p data-testid="no-places">The coders coded this text alike: nothing to walk through.</p>}>
            <div class="row" role="group" aria-label="Places">
              <Show when={isLead() || !follow.following()}>
                <button type="button" class="quiet" disabled={index() === 0} onClick={() => (isLead() ? goTo(index() - 1) : (setIndex(index() - 1), show(place())))}>Previous place</button>
                <button type="button" class="quiet" disabled={index() >= places().length - 1} onClick={() => (isLead() ? goTo(index() + 1) : (setIndex(index() + 1), show(place())))}>Next place</button>
              </Show>
              <span data-testid="walk-place" data-index={index()} data-start={place()?.start}>Place {index() + 1} of {places().length}</span>
            </div>
          </Show>
          <p class="message" role="status" aria-live="polite" data-testid="walk-message">{message() ? `Not done: ${message()}` : notice()}</p>
        </section>

        <Show when={place()} keyed>
          {(p) => (
            <>
              <section aria-labelledby="side-h">
                <h2 id="side-h">Side by side</h2>
                <blockquote class="place-quote">{state.words().slice(p.start, p.end).slice(0, 300)}</blockquote>
                <table class="side-by-side" data-testid="side-by-side">
                  <thead><tr><th scope="col">Coder</th><th scope="col">Codes here</th></tr></thead>
                  <tbody>
                    <For each={p.byCoder}>
                      {(b) => (
                        <tr>
                          <th scope="row">{coderName(b.coderId)}</th>
                          <td>
                            <Show when={canAdjudicate()} fallback={b.codeIds.length ? b.codeIds.map(codeLabel).join(', ') : <span class="muted">no code</span>}>
                              <For each={segmentsOf(p, b.coderId)} fallback={<span class="muted">no code</span>}>
                                {(s) => (
                                  <label class="check">
                                    <input type="checkbox" checked={taken().has(s.id)} onChange={(e) => {
                                      const next = new Set(taken());
                                      if (e.currentTarget.checked) next.add(s.id); else next.delete(s.id);
                                      setTaken(next);
                                    }} />
                                    <CodeSwatch mark={state.marks().marks.get(s.codeId)} />
                                    Take {codeLabel(s.codeId)} <span class="sr-only">from {coderName(b.coderId)}</span>
                                  </label>
                                )}
                              </For>
                            </Show>
                          </td>
                        </tr>
                      )}
                    </For>
                  </tbody>
                </table>
              </section>

              <section aria-labelledby="consensus-h" data-testid="consensus">
                <h2 id="consensus-h">Consensus here</h2>
                <ul class="layers">
                  <For each={consensusHere()} fallback={<li class="muted">Nothing adjudicated here yet.</li>}>
                    {(s) => (
                      <li>
                        <CodeSwatch mark={state.marks().marks.get(s.codeId)} /> {codeLabel(s.codeId)}
                        <Show when={s.note}><span class="muted"> — {s.note}</span></Show>
                        <Show when={canAdjudicate()}>
                          {' '}<button type="button" class="link" onClick={() => attempt(() => removeSegment(consensus!.doc.doc, s.id))} aria-label={`Remove consensus segment ${codeLabel(s.codeId)}`}>Remove</button>
                        </Show>
                      </li>
                    )}
                  </For>
                </ul>
                <Show
                  when={canAdjudicate()}
                  fallback={<p class="muted">{!consensus ? 'This text has no consensus layer in this round.' : props.round.phase === 'closed' ? 'The round is closed: the consensus layer is final.' : 'The lead and the owner adjudicate into the consensus layer.'}</p>}
                >
                  <form class="adjudicate" aria-label="Adjudicate this place" onSubmit={(e) => { e.preventDefault(); take(); }}>
                    <label>Reason (optional) <input value={reason()} onInput={(e) => setReason(e.currentTarget.value)} data-testid="adjudication-reason" /></label>
                    <button type="submit" disabled={taken().size === 0}>Take the ticked segments</button>
                    <div class="row">
                      <label>Or a new segment with the code
                        <select value={newCode()} onChange={(e) => setNewCode(e.currentTarget.value)}>
                          <option value="">choose a code…</option>
                          <For each={state.codes().filter((c) => c.status !== 'merged' && c.status !== 'retired')}>{(c) => <option value={c.id}>{c.label}</option>}</For>
                        </select>
                      </label>
                      <button type="button" class="quiet" onClick={addNew}>Add new segment</button>
                    </div>
                    <p class="muted">A new segment covers the words selected in the text, or the whole place.</p>
                  </form>
                </Show>
              </section>

              <section aria-labelledby="defs-h">
                <h2 id="defs-h">Definitions in play</h2>
                <For each={codesHere()}>
                  {(codeId) => (
                    <Show when={state.codeById().get(codeId)}>
                      <DefinitionField
                        codeId={codeId}
                        field="briefDefinition"
                        label={`${codeLabel(codeId)}: brief definition`}
                        ytext={getDefinitionText(props.codebook.doc, codeId, 'briefDefinition')}
                        awareness={props.codebook.provider.awareness as unknown as Awareness}
                        readOnly={!(props.scope.study()?.role === 'owner' || props.scope.study()?.role === 'lead')}
                        rows={3}
                      />
                      <a href={href({ name: 'codebook', studyId: props.studyId, codeId })}>Whole entry of “{codeLabel(codeId)}”</a>
                    </Show>
                  )}
                </For>
              </section>
            </>
          )}
        </Show>

        <section aria-labelledby="walk-people-h">
          <h2 id="walk-people-h">In this text now</h2>
          <ul class="presence">
            <For each={presence.remote()} fallback={<li class="muted">Only you.</li>}>
              {(p) => <li><span class="swatch" style={{ background: p.colour }} aria-hidden="true" /> {p.name}</li>}
            </For>
          </ul>
        </section>
      </aside>
    </div>
  );
}
