/** OpenAPI paths of calibration rounds (issue 8); openapi.ts spreads them in. */
import { z } from 'zod';
import * as S from './schemas.js';

const secured = [{ session: [] }];
const err = { $ref: '#/components/schemas/Error' };
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { description: ERRORS[c] ?? 'Error', ...json(err) }]));
const path = (name: string) => ({ name, in: 'path', required: true, schema: { type: 'string', format: 'uuid' } });
const toSchema = (s: z.ZodType) => {
  const { $schema: _drop, ...rest } = z.toJSONSchema(s, { target: 'draft-2020-12', io: 'output' }) as Record<string, unknown>;
  return rest;
};
const ERRORS: Record<number, string> = {
  400: 'Invalid body: names what is wrong (unknown text, a participant who may not code, …)',
  401: 'Not signed in',
  403: 'Role (or round phase) does not allow it; the message says why',
  404: 'No such round or text, or not a member of its study',
  409: 'Wrong phase for this action, or a text already in an open round',
};

export const roundSchemas = {
  NewRoundBody: S.NewRoundBody,
  RoundSummary: S.RoundSummary,
  RoundDetail: S.RoundDetail,
  RoundProgress: S.RoundProgress,
  LayerEntry: S.LayerEntry,
  DoneBody: S.DoneBody,
};

const round = toSchema(S.RoundSummary);
const phaseChange = (summary: string, to: string) => ({
  post: {
    summary,
    security: secured,
    parameters: [path('roundId')],
    responses: { '200': { description: `The round, now ${to}`, ...json(round) }, ...errors(401, 403, 404, 409) },
  },
});
const done = { '200': { description: 'The mark', ...json({ type: 'object', properties: { roundId: { type: 'string' }, textId: { type: 'string' }, done: { type: 'boolean' }, doneAt: { type: ['string', 'null'] } } }) } };

export const roundPaths = {
  '/api/studies/{studyId}/rounds': {
    post: {
      summary:
        'Start a calibration round (owner, lead): its texts, participants (members who may code), unit and statistic. Creates one layer per participant and text and a consensus layer per text, and keeps the codebook in force as a named version. Phase: independent.',
      security: secured,
      parameters: [path('studyId')],
      requestBody: { required: true, ...json(toSchema(S.NewRoundBody)) },
      responses: { '201': { description: 'The round', ...json(round) }, ...errors(400, 401, 403, 404, 409) },
    },
    get: {
      summary: "The study's rounds, oldest first (any member)",
      security: secured,
      parameters: [path('studyId')],
      responses: { '200': { description: 'Rounds', ...json({ type: 'array', items: round }) }, ...errors(401, 404) },
    },
  },
  '/api/rounds/{roundId}': {
    get: {
      summary:
        "One round with, per text, the layer rooms the caller may open now (during the independent phase a participant sees their own only; nobody else any round layer). Each layer says its round and kind (coder or consensus).",
      security: secured,
      parameters: [path('roundId')],
      responses: { '200': { description: 'The round', ...json(toSchema(S.RoundDetail)) }, ...errors(401, 404) },
    },
  },
  '/api/rounds/{roundId}/reveal': phaseChange('Reveal the round (owner, lead): round layers open to the team; definition edits from now on are stamped with this round', 'revealed'),
  '/api/rounds/{roundId}/close': phaseChange('Close a revealed round (owner, lead): its layers and consensus become read-only', 'closed'),
  '/api/rounds/{roundId}/texts/{textId}/done': {
    post: { summary: 'Mark a round text done (a participant, independent phase)', security: secured, parameters: [path('roundId'), path('textId')], responses: { ...done, ...errors(401, 403, 404, 409) } },
    delete: { summary: 'Take the done mark back', security: secured, parameters: [path('roundId'), path('textId')], responses: { ...done, ...errors(401, 403, 404, 409) } },
    put: {
      summary: 'Set the done mark from {"done": true|false}',
      security: secured,
      parameters: [path('roundId'), path('textId')],
      requestBody: { required: true, ...json(toSchema(S.DoneBody)) },
      responses: { ...done, ...errors(400, 401, 403, 404, 409) },
    },
  },
  '/api/rounds/{roundId}/agreement': {
    get: {
      summary:
        "Agreement over exactly the round: its texts, its participants' round layers (agreement/coders.ts rule 'participants'), its unit and statistic; the same shape as GET /api/studies/{studyId}/agreement plus `round`. Refused (403) to everyone while the round is independent; afterwards to members who are neither participants nor owner, lead or observer. Reflexive studies: no coefficient, differences side by side",
      security: secured,
      parameters: [
        path('roundId'),
        { name: 'codes', in: 'query', required: false, schema: { type: 'string' }, description: 'code ids, comma-separated (default every code applied)' },
        { name: 'bootstrap', in: 'query', required: false, schema: { type: 'integer', minimum: 0, maximum: 10000 }, description: 'replicates (alpha only)' },
        { name: 'seed', in: 'query', required: false, schema: { type: 'integer', minimum: 0 } },
      ],
      responses: { '200': { description: 'The report', ...json({ type: 'object' }) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/rounds/{roundId}/report': {
    get: {
      summary:
        'The round report (coders and their independence, unit, share double-coded, per-code and pooled coefficients with intervals, number of rounds, how disagreements were resolved, codebook changes; sources in a footnote). format=json (default, for the page), md or csv (downloads). Same access as the round agreement',
      security: secured,
      parameters: [path('roundId'), { name: 'format', in: 'query', required: false, schema: { type: 'string', enum: ['json', 'md', 'csv'] } }],
      responses: {
        '200': {
          description: 'The report',
          content: { 'application/json': { schema: { type: 'object' } }, 'text/markdown': { schema: { type: 'string' } }, 'text/csv': { schema: { type: 'string' } } },
        },
        ...errors(400, 401, 403, 404),
      },
    },
  },
  '/api/rounds/{roundId}/texts/{textId}/read': {
    put: {
      summary: 'Report the words of a round text shown on screen so far (a participant, independent phase; the stored figure only grows and never passes the text’s length)',
      security: secured,
      parameters: [path('roundId'), path('textId')],
      requestBody: { required: true, ...json(toSchema(S.ReadBody)) },
      responses: { '200': { description: 'The stored figure', ...json({ type: 'object', properties: { roundId: { type: 'string' }, textId: { type: 'string' }, wordsRead: { type: 'integer' } } }) }, ...errors(400, 401, 403, 404, 409) },
    },
  },
  '/api/rounds/{roundId}/progress': {
    get: {
      summary: "Progress board: per participant and text, words read, words coded, segments and the done mark (counts only). Owner and lead see everyone; a participant their own row",
      security: secured,
      parameters: [path('roundId')],
      responses: { '200': { description: 'Progress', ...json(toSchema(S.RoundProgress)) }, ...errors(401, 403, 404) },
    },
  },
};
