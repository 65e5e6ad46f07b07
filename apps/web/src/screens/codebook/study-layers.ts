/**
 * Loads every layer of a study that this person may read, for second-cycle previews: opens each
 * layer document, waits for it, lists its segments, and releases it. Reports progress as it goes.
 */
import { listSegments, type SegmentRecord } from '@gloss/model';
import { api } from '../../api/client.js';
import { openDoc, type OpenDoc } from '../../sync/open-doc.js';

export interface LoadedLayers {
  /** layer room -> its segments */
  segments: Map<string, SegmentRecord[]>;
  /** layer room -> a label for people: coder and text */
  labels: Map<string, string>;
  /** the rooms this person may write (their own layers): merges and splits are applied to these at once */
  writable: OpenDoc[];
  release(): void;
}

export async function loadStudyLayers(studyId: string, onProgress: (done: number, total: number) => void): Promise<LoadedLayers> {
  const texts = await api.texts(studyId);
  const details = await Promise.all(texts.map((t) => api.text(t.id)));
  const all = details.flatMap((d) => d.layers.map((l) => ({ d, l })));
  const segments = new Map<string, SegmentRecord[]>();
  const labels = new Map<string, string>();
  const handles: OpenDoc[] = [];
  const writable: OpenDoc[] = [];
  let done = 0;
  onProgress(0, all.length);
  await Promise.all(
    all.map(async ({ d, l }) => {
      const h = openDoc(l.room, { label: `${l.name ?? 'a'} layer`, gc: false, offline: !!l.mine });
      handles.push(h);
      await h.whenReady;
      segments.set(l.room, listSegments(h.doc));
      labels.set(l.room, `${l.name ?? l.coderId} on “${d.title}”`);
      if (l.mine) writable.push(h);
      onProgress(++done, all.length);
    }),
  );
  return { segments, labels, writable, release: () => handles.forEach((h) => h.release()) };
}
