/**
 * The codebook as a tree (parent and child codes), with themes and mutually exclusive sets beside it.
 * Each code's swatch is its colour and line, as in the coding view (never colour alone).
 */
import { For, Show } from 'solid-js';
import type { CodeGroup, CodeMark, CodeTreeNode, CodeView } from '@gloss/model';
import { CodeSwatch } from '../../ui/CodeSwatch.js';

export function CodeTree(props: { nodes: CodeTreeNode[]; marks: ReadonlyMap<string, CodeMark>; chosen?: string; onChoose: (id: string) => void }) {
  return (
    <ul role="tree" aria-label="Codes" class="tree">
      <For each={props.nodes}>{(n) => <Node node={n} level={1} marks={props.marks} chosen={props.chosen} onChoose={props.onChoose} />}</For>
    </ul>
  );
}

function Node(props: { node: CodeTreeNode; level: number; marks: ReadonlyMap<string, CodeMark>; chosen?: string; onChoose: (id: string) => void }) {
  const c = () => props.node.code;
  return (
    <li role="treeitem" aria-level={props.level} aria-selected={props.chosen === c().id} aria-expanded={props.node.children.length ? true : undefined}>
      <button type="button" class="tree-item" classList={{ chosen: props.chosen === c().id, gone: c().status === 'merged' || c().status === 'retired' }} onClick={() => props.onChoose(c().id)}>
        <CodeSwatch mark={props.marks.get(c().id)} /> {c().label}
        <Show when={c().status !== 'active'}> <span class="tag">{c().status}</span></Show>
      </button>
      <Show when={props.node.children.length}>
        <ul role="group">
          <For each={props.node.children}>{(n) => <Node node={n} level={props.level + 1} marks={props.marks} chosen={props.chosen} onChoose={props.onChoose} />}</For>
        </ul>
      </Show>
    </li>
  );
}

export function GroupList(props: { title: string; groups: CodeGroup[]; codes: Map<string, CodeView>; onChoose: (id: string) => void; testid: string }) {
  return (
    <section aria-label={props.title} data-testid={props.testid}>
      <h3>{props.title}</h3>
      <ul class="groups">
        <For each={props.groups} fallback={<li class="muted">None yet.</li>}>
          {(g) => (
            <li>
              <strong>{g.label}</strong>:{' '}
              <For each={g.codeIds}>
                {(id, i) => <>{i() > 0 ? ', ' : ''}<button type="button" class="link" onClick={() => props.onChoose(id)}>{props.codes.get(id)?.label ?? id}</button></>}
              </For>
            </li>
          )}
        </For>
      </ul>
    </section>
  );
}
