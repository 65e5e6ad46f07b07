/** The study's words as the candidate finder reads them: transcripts, then every other place (study-docs.ts). */
import type { Db } from '@gloss/db';
import { docStrings, readText } from '@gloss/model';
import { loadDoc, type DocLoader } from '../projection/load-doc.js';
import type { Source } from './finder.js';
import { PLACES, studyComments, studyDetails, studyRounds, studySharedDocs, studyTitles } from './study-docs.js';
import { studyTexts } from './study-texts.js';

export async function readStudyWords(db: Db, store: DocLoader, studyId: string): Promise<Array<Source & { title: string }>> {
  const out: Array<Source & { title: string }> = [];
  for (const t of await studyTexts(db, studyId)) {
    const doc = await loadDoc(store, t.docId);
    out.push({ id: t.textId, title: t.title, text: readText(doc) });
    doc.destroy();
  }
  return out;
}

/** Every string of the codebook, memos and layers (notes), comments' bodies, text titles, the study's details and its rounds' names, each named by its place. */
export async function otherWords(db: Db, store: DocLoader, studyId: string): Promise<Source[]> {
  const out: Source[] = [];
  const fromDoc = async (docId: string, where: string) => {
    const doc = await loadDoc(store, docId);
    try {
      for (const s of docStrings(doc)) out.push({ id: `${docId}:${s.path}`, text: s.text, where });
    } finally {
      doc.destroy();
    }
  };
  for (const shared of await studySharedDocs(db, studyId)) await fromDoc(shared.id, PLACES[shared.kind]);
  for (const t of await studyTexts(db, studyId)) for (const layer of t.layerIds) await fromDoc(layer, PLACES.notes);
  for (const c of await studyComments(db, studyId)) out.push({ id: c.id, text: c.body, where: PLACES.comments });
  for (const t of await studyTitles(db, studyId)) out.push({ id: `title:${t.id}`, text: t.title, where: PLACES.titles });
  const details = await studyDetails(db, studyId);
  if (details) for (const [field, text] of Object.entries(details)) if (text) out.push({ id: `study:${field}`, text, where: PLACES.study });
  for (const r of await studyRounds(db, studyId)) {
    out.push({ id: `round:${r.id}:name`, text: r.name, where: PLACES.rounds });
    if (r.purpose) out.push({ id: `round:${r.id}:purpose`, text: r.purpose, where: PLACES.rounds });
  }
  return out;
}
