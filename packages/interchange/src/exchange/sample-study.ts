/**
 * Test support: an invented study as plain data, with the awkward cases on purpose — text outside the
 * Basic Multilingual Plane, non-Latin scripts, quotes, commas and line breaks in the words, nested
 * codes, a mutually exclusive set and a theme, cases with typed attributes, memos and a jotting.
 */
import type { StudyData } from './study-data.js';

const T1 = 'We rowed out at dawn, "before the gulls", she said.\nThe nets were 🐟🐟 heavy — ça pèse, honestly.\nΚαλημέρα, 港口 was quiet.';
const T2 = 'Line one of the ferry notes.\r\nLine two, with a comma, and "quotes".';

export function sampleStudy(): StudyData {
  const at = Date.UTC(2026, 2, 4, 9, 30);
  const i = (s: string, w: string) => s.indexOf(w);
  return {
    title: 'Harbour lives (invented)',
    description: 'An invented study for tests.',
    coders: [
      { id: 'u-ada', name: 'Ada Quillfeather', email: 'ada@example.org' },
      { id: 'u-bo', name: 'Bo Lindqvist-Marr', email: 'bo@example.org' },
    ],
    codes: [
      { id: 'k-work', label: 'Work at sea', parentId: null, colour: '#0072b2', type: 'theory-driven', status: 'active', briefDefinition: 'Talk about fishing work.', fullDefinition: 'Any account of the tasks of fishing.\nIncludes preparing nets.', inclusion: 'Tasks, tools, hours.', exclusion: 'Leisure sailing.', examples: [{ textId: 't1', quote: 'We rowed out at dawn' }], nearMisses: [{ textId: 't1', quote: 'was quiet' }], mergedInto: null, inVivo: false, createdAt: at, history: [{ at, by: 'u-ada', kind: 'add', round: 0, detail: 'Work at sea' }] },
      { id: 'k-nets', label: 'Nets, "heavy"', parentId: 'k-work', colour: '#e69f00', type: 'data-driven', status: 'active', briefDefinition: 'Nets and their weight.', fullDefinition: '', inclusion: '', exclusion: '', examples: [], nearMisses: [], mergedInto: null, inVivo: false, createdAt: at + 1, history: [] },
      { id: 'k-deep', label: 'Catch', parentId: 'k-nets', colour: '#009e73', type: 'data-driven', status: 'draft', briefDefinition: '', fullDefinition: '', inclusion: '', exclusion: '', examples: [], nearMisses: [], mergedInto: null, inVivo: false, createdAt: at + 2, history: [] },
      { id: 'k-calm', label: 'Calm', parentId: null, colour: '#cc79a7', type: 'structural', status: 'active', briefDefinition: 'Quiet moments.', fullDefinition: '', inclusion: '', exclusion: '', examples: [], nearMisses: [], mergedInto: null, inVivo: false, createdAt: at + 3, history: [] },
    ],
    groups: [
      { id: 'x1', label: 'Mood', kind: 'exclusive', codeIds: ['k-calm', 'k-work'] },
      { id: 't1g', label: 'Livelihood', kind: 'theme', codeIds: ['k-nets', 'k-work'] },
    ],
    attributes: [
      { id: 'a-age', name: 'Age', type: 'number' },
      { id: 'a-port', name: 'Home port', type: 'choice', choices: ['North', 'South'] },
      { id: 'a-since', name: 'Fishing since', type: 'date' },
      { id: 'a-own', name: 'Owns a boat', type: 'boolean' },
    ],
    cases: [
      { id: 'c1', name: 'P01 Mira', kind: 'participant', values: { 'a-age': 54, 'a-port': 'North', 'a-since': '1990-05-01', 'a-own': true }, textIds: ['t1'] },
      { id: 'c2', name: 'P02 Tomas', kind: 'participant', values: { 'a-age': 37.5, 'a-port': 'South', 'a-own': false }, textIds: ['t2'] },
    ],
    memos: [
      { id: 'm1', kind: 'memo', author: 'u-ada', title: 'Dawn as a theme', body: 'Dawn recurs.\nAsk about winter.', attachedTo: { kind: 'code', codeId: 'k-work' }, createdAt: at, updatedAt: at + 5 },
      { id: 'm2', kind: 'jotting', author: 'u-bo', title: '', body: 'fish emoji?? 🐟', attachedTo: { kind: 'segment', textId: 't1', segmentId: 's2' }, createdAt: at + 7, updatedAt: at + 7 },
      { id: 'm3', kind: 'memo', author: 'u-ada', title: 'Study plan', body: 'Two harbours, two seasons.', attachedTo: { kind: 'study' }, createdAt: at + 9, updatedAt: at + 9 },
      { id: 'm4', kind: 'memo', author: 'u-bo', title: 'Ferry', body: 'CRLF text.', attachedTo: { kind: 'text', textId: 't2' }, createdAt: at + 11, updatedAt: at + 11 },
    ],
    texts: [
      { id: 't1', title: 'Interview P01, quay', content: T1, turns: [{ start: 0, speaker: 'P01', startMs: 0, endMs: 4000 }, { start: T1.indexOf('The nets'), speaker: 'I', startMs: 4000, endMs: null }, { start: T1.indexOf('Καλ'), speaker: 'P01', startMs: 61_250, endMs: null }] },
      { id: 't2', title: 'Ferry notes, P02', content: T2, turns: [{ start: 0, speaker: null, startMs: null, endMs: null }] },
    ],
    segments: [
      { id: 's1', textId: 't1', coderId: 'u-ada', codeId: 'k-work', start: 0, end: i(T1, ' at dawn'), quote: 'We rowed out', createdAt: at + 20 },
      { id: 's2', textId: 't1', coderId: 'u-ada', codeId: 'k-deep', start: i(T1, '🐟'), end: i(T1, ' heavy'), quote: '🐟🐟', createdAt: at + 21, note: 'the fish, drawn' },
      { id: 's3', textId: 't1', coderId: 'u-bo', codeId: 'k-nets', start: i(T1, 'The nets'), end: i(T1, ', honestly'), quote: 'The nets were 🐟🐟 heavy — ça pèse', createdAt: at + 22 },
      { id: 's4', textId: 't1', coderId: 'u-bo', codeId: 'k-calm', start: i(T1, '港口'), end: T1.length, quote: '港口 was quiet.', createdAt: at + 23 },
      { id: 's5', textId: 't2', coderId: 'u-bo', codeId: 'k-work', start: i(T2, 'Line two'), end: T2.length, quote: 'Line two, with a comma, and "quotes".', createdAt: at + 24 },
      { id: 's6', textId: 't1', coderId: 'u-ada', codeId: 'k-calm', start: i(T1, '"before'), end: i(T1, ' she said') , quote: '"before the gulls",', createdAt: at + 25 },
    ],
  };
}
