/**
 * Codes as the coding view and the codebook show them: the codebook's codes, then the pending
 * proposals, in codebook order. Both screens give this list to model `assignMarks`, so a code has
 * the same colour-and-line swatch on each.
 */
import { getCodes, pendingProposalCodes, type CodeView } from '@gloss/model';
import type * as Y from 'yjs';

export function codesInView(codebook: Y.Doc): CodeView[] {
  return [...getCodes(codebook), ...pendingProposalCodes(codebook)];
}

/**
 * The warning when codes outnumber the colour-and-line pairs that can be told apart (one wording for
 * every screen); `pairs` is model `assignMarks`' count for these codes.
 */
export function marksOverflowWords(codeCount: number, pairs: number): string {
  return `This codebook has ${codeCount} codes, more than the ${pairs} colour-and-line pairs that can be told apart: some codes share one, so read the code names rather than the colours.`;
}
