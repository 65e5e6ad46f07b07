/**
 * Speaker → case mapping of an upload: what each speaker label of a file becomes (an existing case,
 * a new case named after the label, or nothing), and applying it to the codebook document once the
 * text exists. Pure apart from the model calls on the given document.
 */
import { addCase, linkSpeaker, type CaseView } from '@gloss/model';
import type * as Y from 'yjs';

/** `case:<id>` an existing case; `new` a new case named after the speaker; `none` not a case. */
export type CaseChoice = `case:${string}` | 'new' | 'none';

const INTERVIEWER = /^(i|int|interviewer|researcher|moderator|facilitator)$/i;

/** A first guess: the case of the same name, nothing for the interviewer, otherwise a new case. */
export function guessChoice(label: string, cases: CaseView[]): CaseChoice {
  const same = cases.find((c) => c.name.trim().toLowerCase() === label.trim().toLowerCase());
  if (same) return `case:${same.id}`;
  return INTERVIEWER.test(label.trim()) ? 'none' : 'new';
}

/**
 * Links the text to the chosen cases. `created` remembers cases made earlier in the same upload by
 * label, so one new speaker across several files becomes one case. Returns how many links were made.
 */
export function applyMapping(doc: Y.Doc, textId: string, choices: Record<string, CaseChoice>, created: Map<string, string>): number {
  let n = 0;
  doc.transact(() => {
    for (const [label, choice] of Object.entries(choices)) {
      if (choice === 'none') continue;
      let caseId: string;
      if (choice === 'new') {
        const key = label.trim().toLowerCase();
        caseId = created.get(key) ?? addCase(doc, { name: label.trim(), kind: 'participant' });
        created.set(key, caseId);
      } else caseId = choice.slice('case:'.length);
      linkSpeaker(doc, caseId, textId, label);
      n++;
    }
  });
  return n;
}
