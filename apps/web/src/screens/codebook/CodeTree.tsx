/**
 * The codebook as a tree (parent and child codes), with themes and mutually exclusive sets beside it.
 * The WAI-ARIA Authoring Practices' tree view pattern: the tree is one Tab stop (roving tabindex on the
 * treeitems, which hold no buttons), ↓/↑ move, → opens a parent or goes to its first child, ← closes it
 * or goes to the parent, Home/End, Enter or Space (or a click) opens the code's entry. Each code's swatch
 * is its colour and line, as in the coding view (never colour alone).
 */
import { For, Show, createSignal } from 'solid-js';
import type { CodeGroup, CodeMark, CodeTreeNode, CodeView } from '@gloss/model';
import { CodeSwatch } from '../../ui/CodeSwatch.js';

interface TreeState {
  marks: ReadonlyMap<string, CodeMark>;
  chosen: string | undefined;
  onChoose: (id: string) => void;
  closed: () => ReadonlySet<string>;
  tabStop: () => string | undefined;
  setFocus: (id: string) => void;
}

export function CodeTree(props: { nodes: CodeTreeNode[]; marks: ReadonlyMap<string, CodeMark>; chosen?: string; onChoose: (id: string) => void }) {
  let root: HTMLUListElement | undefined;
  const [closed, setClosed] = createSignal<ReadonlySet<string>>(new Set());
  const [focused, setFocused] = createSignal<string | undefined>();
  const ids = () => new Set(props.nodes.flatMap(function all(n: CodeTreeNode): string[] { return [n.code.id, ...n.children.flatMap(all)]; }));
  // the one Tab stop: the last focused code while it is still there, else the chosen one, else the first
  const tabStop = () => [focused(), props.chosen].find((id) => id !== undefined && ids().has(id)) ?? props.nodes[0]?.code.id;
  const state: TreeState = {
    get marks() { return props.marks; },
    get chosen() { return props.chosen; },
    get onChoose() { return props.onChoose; },
    closed, tabStop, setFocus: setFocused,
  };
  const shown = () => Array.from(root?.querySelectorAll<HTMLElement>('[role="treeitem"]') ?? []).filter((el) => el.offsetParent !== null);
  const toggle = (id: string, open: boolean) => setClosed((prev) => {
    const next = new Set(prev);
    if (open) next.delete(id); else next.add(id);
    return next;
  });
  const onKeyDown = (e: KeyboardEvent) => {
    const item = e.target instanceof HTMLElement && e.target.getAttribute('role') === 'treeitem' ? e.target : null;
    if (!item) return;
    const list = shown();
    const at = list.indexOf(item);
    const id = item.dataset.id!;
    const hasChildren = item.getAttribute('aria-expanded') !== null;
    const isOpen = item.getAttribute('aria-expanded') === 'true';
    const to = (el: HTMLElement | null | undefined) => el?.focus();
    switch (e.key) {
      case 'ArrowDown': to(list[at + 1]); break;
      case 'ArrowUp': to(list[at - 1]); break;
      case 'Home': to(list[0]); break;
      case 'End': to(list[list.length - 1]); break;
      case 'ArrowRight':
        if (hasChildren && !isOpen) toggle(id, true);
        else if (isOpen) to(document.getElementById(item.getAttribute('aria-owns') ?? '')?.querySelector<HTMLElement>('[role="treeitem"]'));
        break;
      case 'ArrowLeft':
        if (isOpen) toggle(id, false);
        else to(item.closest('[role="group"]')?.previousElementSibling as HTMLElement | null);
        break;
      case 'Enter': case ' ': props.onChoose(id); break;
      default: return;
    }
    e.preventDefault();
    e.stopPropagation();
  };
  return (
    <ul role="tree" aria-label="Codes" class="tree" ref={root} onKeyDown={onKeyDown}>
      <For each={props.nodes}>{(n) => <Node node={n} level={1} tree={state} />}</For>
    </ul>
  );
}

function Node(props: { node: CodeTreeNode; level: number; tree: TreeState }) {
  const c = () => props.node.code;
  const parent = () => props.node.children.length > 0;
  const open = () => !props.tree.closed().has(c().id);
  // the treeitem holds only its own row and owns its children's group (aria-owns), so its name and its
  // visible text are the same words and a click lands on the row it means
  return (
    <li role="none">
      <div
        role="treeitem"
        data-id={c().id}
        tabindex={props.tree.tabStop() === c().id ? 0 : -1}
        aria-level={props.level}
        aria-selected={props.tree.chosen === c().id}
        aria-expanded={parent() ? open() : undefined}
        aria-owns={parent() && open() ? `tg-${c().id}` : undefined}
        class="tree-item"
        classList={{ chosen: props.tree.chosen === c().id, gone: c().status === 'merged' || c().status === 'retired' }}
        onFocus={() => props.tree.setFocus(c().id)}
        onClick={() => props.tree.onChoose(c().id)}
      >
        <Show when={parent()}><span class="tree-twisty" aria-hidden="true">{open() ? '▾' : '▸'}</span></Show>
        <CodeSwatch mark={props.tree.marks.get(c().id)} /> {c().label}
        <Show when={c().status !== 'active'}> <span class="tag">{c().status}</span></Show>
      </div>
      <Show when={parent() && open()}>
        <ul role="group" id={`tg-${c().id}`}>
          <For each={props.node.children}>{(n) => <Node node={n} level={props.level + 1} tree={props.tree} />}</For>
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
