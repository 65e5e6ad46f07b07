import { END_POSITION_NOTE } from './export.js';

/** Said to the user before an import (spec §7). */
export function importLosses(format: 'qdc' | 'qdpx'): string[] {
  const common = [
    'Code descriptions become brief definitions, unless they hold Gloss\'s own labelled sections (definition, when to use, when not to use, examples), which are read back.',
    'Codes get new ids in Gloss; hierarchy, names and colours are kept. Sets become themes, or mutually exclusive sets where the file says so.',
    'The file carries no codebook history, rounds or agreement: the imported codes start a fresh history.',
  ];
  if (format === 'qdc') return common;
  return [
    ...common,
    'Only text sources are imported: pictures, PDFs, audio and video, links and graphs are left out.',
    `${END_POSITION_NOTE} On import both readings of the end position are accepted: files written by Gloss, and files where a selection ends after the last character, are read exclusive; files with a selection whose end equals its start are read inclusive (the spec's "last character"); otherwise exclusive, as in the spec's example. The report says which reading was used.`,
    'Each coding becomes a segment in the layer of the user who made it; users are matched to accounts by email, and a user with no account gets one (without a password) as a coder of the study.',
    'Notes become memos (or jottings, where Gloss marked them), attached where the file refers to them.',
  ];
}
