/** The connection-status store: every open document, its link and what it has waiting to be sent. */
import { createSignal } from 'solid-js';
import type { OpenDoc } from './open-doc.js';

const [docs, setDocs] = createSignal<OpenDoc[]>([]);

export function registerDoc(d: OpenDoc): void {
  setDocs((all) => [...all, d]);
}
export function unregisterDoc(d: OpenDoc): void {
  setDocs((all) => all.filter((x) => x !== d));
}

export const openDocs = docs;

export type Overall = 'idle' | 'online' | 'connecting' | 'offline' | 'paused' | 'lost';

export function overall(): Overall {
  const all = docs();
  if (all.length === 0) return 'idle';
  if (all.some((d) => d.lost() !== null)) return 'lost';
  const links = all.map((d) => d.link());
  if (links.every((l) => l === 'connected')) return 'online';
  if (links.some((l) => l === 'paused')) return 'paused';
  if (links.some((l) => l === 'disconnected')) return 'offline';
  return 'connecting';
}

/** Documents with local changes not yet sent, for the plain-words summary. */
export function waiting(): Array<{ label: string; count: number }> {
  return docs()
    .filter((d) => d.pending() > 0)
    .map((d) => ({ label: d.label, count: d.pending() }));
}

/** What the server took away and why, once per reason (the same sign-out closes every open document). */
export function lostAccess(): string[] {
  return [...new Set(docs().flatMap((d) => d.lost() ?? []))];
}

/** Documents whose last change the server refused, with its words (shown until dismissed). */
export function refusedChanges(): Array<{ doc: OpenDoc; reason: string }> {
  return docs().flatMap((d) => {
    const reason = d.refused();
    return reason === null ? [] : [{ doc: d, reason }];
  });
}
