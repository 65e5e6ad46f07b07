/** The study's cases and attributes, read from the codebook document and re-read after each change to it. */
import { createEffect, createSignal, onCleanup, type Accessor } from 'solid-js';
import { listAttributes, listCases, type AttributeDef, type CaseView } from '@gloss/model';
import type * as Y from 'yjs';
import type { StudyScope } from '../study/study-context.js';

export interface CasesState {
  doc: Y.Doc;
  cases: CaseView[];
  attributes: AttributeDef[];
}

export function useCases(scope: StudyScope): Accessor<CasesState | undefined> {
  const [state, setState] = createSignal<CasesState>();
  createEffect(() => {
    const cb = scope.codebook();
    if (!cb) return;
    let live = true;
    const read = () => live && setState({ doc: cb.doc, cases: listCases(cb.doc), attributes: listAttributes(cb.doc) });
    void cb.whenReady.then(read);
    cb.doc.on('update', read);
    onCleanup(() => {
      live = false;
      cb.doc.off('update', read);
    });
  });
  return state;
}
