/**
 * Everything the screens of one study share: the study record, its codebook and memos documents,
 * and study-wide presence (who is here and which text they have open), published on the codebook
 * room's awareness.
 */
import { createEffect, createResource, createSignal, onCleanup, untrack, type Accessor, type Resource } from 'solid-js';
import { trackFieldEdits } from '@gloss/model';
import { api } from '../../api/client.js';
import type { Me, Study } from '../../api/types.js';
import { openDoc, type OpenDoc } from '../../sync/open-doc.js';
import { personColour } from '../../doc/palette.js';

export interface PresenceEntry { clientId: number; userId: string; name: string; colour: string; textId?: string; textTitle?: string }

export interface StudyScope {
  study: Resource<Study>;
  codebook: Accessor<OpenDoc | undefined>;
  memos: Accessor<OpenDoc | undefined>;
  presence: Accessor<PresenceEntry[]>;
  /** Announce which text (if any) this person has open. */
  setWhere(textId?: string, textTitle?: string): void;
}

export function useStudy(studyId: () => string, me: () => Me): StudyScope {
  const [study] = createResource(studyId, (id) => api.study(id));
  const [codebook, setCodebook] = createSignal<OpenDoc>();
  const [memos, setMemos] = createSignal<OpenDoc>();
  const [presence, setPresence] = createSignal<PresenceEntry[]>([]);
  let where: { textId?: string; textTitle?: string } = {};

  const refresh = (cb: OpenDoc) => {
    const out: PresenceEntry[] = [];
    cb.provider.awareness.getStates().forEach((st, clientId) => {
      const u = st.user as { id?: string; name?: string; colour?: string } | undefined;
      if (!u?.id) return;
      const w = (st.where ?? {}) as { textId?: string; textTitle?: string };
      out.push({ clientId, userId: u.id, name: u.name ?? '', colour: u.colour ?? '#777777', textId: w.textId, textTitle: w.textTitle });
    });
    setPresence(out);
  };

  const track = (s: Study) => {
    const cb = openDoc(s.codebookRoom, { label: 'the codebook' });
    // the memos wait for the documents a screen is opening (see openDoc's `background`)
    // the memos copy is kept per view: the server sends each reader only the memos they may read
    let mm: OpenDoc | undefined;
    let ended = false;
    let lastView = s.memosView;
    const openMemos = (view: string | undefined) => {
      const handle = openDoc(s.memosRoom, { label: 'the memos', background: true, ...(view ? { view } : {}) });
      // What this person may read widened (a text assigned, a round revealed): the server refused this
      // copy (4409) and it is deleted; ask for the new view and open a fresh copy in its place. The
      // screens follow the `memos` signal, so the page is not reloaded and nothing else is lost.
      const stop = handle.onViewChanged(() => {
        stop();
        void (async () => {
          const fresh = await api.study(s.id).catch(() => null);
          if (ended || mm !== handle) return;
          const view = fresh?.memosView ?? lastView;
          // the same key again would only be refused again: give the server's change a moment
          if (view === lastView) await new Promise((r) => setTimeout(r, 2_000));
          if (ended || mm !== handle) return;
          lastView = view;
          handle.release();
          openMemos(view);
        })();
      });
      mm = handle;
      setMemos(handle);
    };
    setCodebook(cb);
    openMemos(s.memosView);
    const user = me();
    cb.provider.awareness.setLocalStateField('user', { id: user.id, name: user.name, colour: personColour(user.id) });
    cb.provider.awareness.setLocalStateField('where', where);
    const on = () => refresh(cb);
    cb.provider.awareness.on('change', on);
    refresh(cb);
    // Definition edits typed here are recorded (who, when, the round in force, what this copy had seen)
    // for the definition-race and stale-definition flags (model field-edits.ts).
    const stopRecording = trackFieldEdits(cb.doc, { by: user.id });
    onCleanup(() => {
      stopRecording();
      cb.provider.awareness.off('change', on);
      ended = true;
      cb.release();
      mm?.release();
    });
  };

  // open the documents once the study record has arrived; release them when the scope ends
  createEffect(() => {
    const s = study();
    if (s) untrack(() => track(s));
  });
  return {
    study,
    codebook,
    memos,
    presence,
    setWhere(textId, textTitle) {
      where = { textId, textTitle };
      codebook()?.provider.awareness.setLocalStateField('where', where);
    },
  };
}
