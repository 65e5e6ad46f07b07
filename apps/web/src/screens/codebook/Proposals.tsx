/**
 * Code proposals (a coder's new or in vivo codes): the lead and owner accept, rename or merge each one
 * into an existing code; everyone sees the proposals and what became of them, live.
 */
import { For, Show, createSignal } from 'solid-js';
import type * as Y from 'yjs';
import { acceptProposal, listProposals, mergeProposal, type CodeView, type ProposalView } from '@gloss/model';
import { useY } from '../../ui/use-ydoc.js';
import { createAttempt } from '../../ui/attempt.js';

export function Proposals(props: { codebook: Y.Doc; codes: CodeView[]; canDecide: boolean; by: string; nameOf: (id: string) => string }) {
  const proposals = useY(props.codebook.getMap('proposals'), () => listProposals(props.codebook));
  const { message, attempt } = createAttempt();
  const labelOf = (id: string | null) => props.codes.find((c) => c.id === id)?.label ?? 'another code';
  const outcome = (p: ProposalView) =>
    p.status === 'merged' ? `merged into “${labelOf(p.mergedInto)}”` : p.decidedLabel !== null && p.decidedLabel !== p.label ? `accepted as “${p.decidedLabel}”` : 'accepted';
  return (
    <section class="proposals" aria-labelledby="proposals-h" data-testid="proposals">
      <h2 id="proposals-h">Proposed codes</h2>
      <Show when={proposals().length > 0} fallback={<p class="muted">No codes proposed.</p>}>
        <ul>
          <For each={proposals()}>
            {(p) => (
              <li data-testid="proposal">
                <strong>{p.label}</strong> <span class="muted">by {props.nameOf(p.author)}{p.quote && !p.inVivo ? `, on “${p.quote}”` : ''}</span>{' '}
                <Show when={p.status === 'pending'} fallback={<span class="tag" data-testid="proposal-outcome">{outcome(p)}</span>}>
                  <span class="tag">waiting for the lead</span>
                  <Show when={props.canDecide}>
                    <Decide proposal={p} codes={props.codes} onAccept={(label) => attempt(() => acceptProposal(props.codebook, p.id, { by: props.by }, label))} onMerge={(into) => attempt(() => mergeProposal(props.codebook, p.id, into, { by: props.by }))} />
                  </Show>
                </Show>
              </li>
            )}
          </For>
        </ul>
      </Show>
      <Show when={message()}><p class="error" role="alert">{message()}</p></Show>
    </section>
  );
}

function Decide(props: { proposal: ProposalView; codes: CodeView[]; onAccept: (label: string) => void; onMerge: (into: string) => void }) {
  const [label, setLabel] = createSignal(props.proposal.label);
  const [into, setInto] = createSignal('');
  const active = () => props.codes.filter((c) => c.status === 'active' || c.status === 'draft');
  return (
    <div class="decide">
      <form class="inline-form" aria-label={`Accept ${props.proposal.label}`} onSubmit={(e) => { e.preventDefault(); props.onAccept(label()); }}>
        <label>Label <input value={label()} onInput={(e) => setLabel(e.currentTarget.value)} /></label>
        <button type="submit">{label().trim() === props.proposal.label ? 'Accept' : 'Accept renamed'}</button>
      </form>
      <form class="inline-form" aria-label={`Merge ${props.proposal.label}`} onSubmit={(e) => { e.preventDefault(); if (into()) props.onMerge(into()); }}>
        <label>Merge into
          <select value={into()} onChange={(e) => setInto(e.currentTarget.value)}>
            <option value="">choose a code…</option>
            <For each={active()}>{(c) => <option value={c.id}>{c.label}</option>}</For>
          </select>
        </label>
        <button type="submit" disabled={!into()}>Merge</button>
      </form>
    </div>
  );
}
