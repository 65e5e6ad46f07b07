/** OpenAPI paths of supervision (issue 9): assignments, review states, references, settings, progress. */
import { z } from 'zod';
import * as S from './schemas.js';

const secured = [{ session: [] }];
const err = { $ref: '#/components/schemas/Error' };
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const ERRORS: Record<number, string> = {
  400: 'Invalid body: names what is wrong (a person who is not a trainee or coder, a return without a note, …)',
  401: 'Not signed in',
  403: 'Only owners and leads supervise; the message says why',
  404: 'No such study, text, layer or assignment — or a trainee the text is not assigned to',
};
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { description: ERRORS[c] ?? 'Error', ...json(err) }]));
const path = (name: string) => ({ name, in: 'path', required: true, schema: { type: 'string', format: 'uuid' } });
const toSchema = (s: z.ZodType) => {
  const { $schema: _drop, ...rest } = z.toJSONSchema(s, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>;
  return rest;
};

const assignment = {
  type: 'object',
  properties: {
    textId: { type: 'string', format: 'uuid' },
    textTitle: { type: 'string' },
    userId: { type: 'string', format: 'uuid' },
    userName: { type: 'string' },
    role: { type: 'string' },
    assignedAt: { type: 'string', format: 'date-time' },
    reviewState: { type: 'string', enum: ['assigned', 'returned', 'accepted'] },
    reviewNote: { type: 'string', description: 'what to look at again (with a return)' },
    reviewedAt: { type: ['string', 'null'], format: 'date-time' },
    reviewedBy: { type: ['string', 'null'] },
    comparisonShared: { type: 'boolean', description: 'the assignee may read the text’s reference layer' },
    reference: { type: ['string', 'null'], description: 'the text’s reference layer room' },
  },
};
const settings = { type: 'object', properties: { toleranceWords: { type: 'integer' }, driftThreshold: { type: 'number' } } };
const counts = { type: 'object', properties: Object.fromEntries(['matched', 'missed', 'extra', 'otherCode', 'otherBoundary'].map((k) => [k, { type: 'integer' }])) };
const progress = {
  type: 'object',
  properties: {
    mode: { type: 'string', enum: ['standard', 'reflexive'] },
    settings,
    sources: { type: 'string' },
    trainees: {
      type: 'array',
      items: {
        type: 'object',
        properties: {
          userId: { type: 'string' },
          name: { type: 'string' },
          points: {
            type: 'array',
            items: {
              type: 'object',
              properties: {
                roundId: { type: 'string' },
                roundNumber: { type: 'integer' },
                roundName: { type: 'string' },
                statistic: { type: 'string' },
                unit: { type: 'string' },
                value: { type: ['number', 'null'], description: 'null in a reflexive study, without a reference, or when not computable (see note)' },
                counts,
                texts: { type: 'integer' },
                drift: { type: 'boolean', description: 'fell by more than the drift threshold since the previous round with a value' },
                note: { type: 'string' },
              },
            },
          },
        },
      },
    },
  },
};
const one = [path('studyId'), path('textId'), path('userId')];
const reference = { type: 'object', properties: { textId: { type: 'string' }, layer: { type: ['string', 'null'] } } };

export const supervisionPaths = {
  '/api/studies/{studyId}/assignments': {
    get: {
      summary: 'Assignments with their review state: all of them for owners and leads, one’s own for everyone else',
      security: secured,
      parameters: [path('studyId')],
      responses: { '200': { description: 'Assignments', ...json({ type: 'object', properties: { assignments: { type: 'array', items: assignment } } }) }, ...errors(401, 404) },
    },
    post: {
      summary: 'Assign a text to a trainee or coder (owner, lead). A trainee reads only texts assigned to them (or in a round they take part in), by every route and room.',
      security: secured,
      parameters: [path('studyId')],
      requestBody: { required: true, ...json(toSchema(S.AssignBody)) },
      responses: { '201': { description: 'The assignment', ...json(assignment) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/assignments/{textId}/{userId}': {
    delete: {
      summary: 'Take an assignment away (owner, lead); the person’s open connections to the text’s rooms are re-checked at once, on every node',
      security: secured,
      parameters: one,
      responses: { '204': { description: 'Unassigned' }, ...errors(401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/assignments/{textId}/{userId}/review': {
    post: {
      summary: 'Set the review state (owner, lead): returned (with feedback: the note says what to look at again), accepted, or back to assigned',
      security: secured,
      parameters: one,
      requestBody: { required: true, ...json(toSchema(S.ReviewBody)) },
      responses: { '200': { description: 'The assignment', ...json(assignment) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/assignments/{textId}/{userId}/share': {
    post: {
      summary: 'Share the comparison with the assignee (owner, lead): they may then read the text’s reference layer (read-only) and compare their layer with it',
      security: secured,
      parameters: one,
      requestBody: { required: true, ...json(toSchema(S.ShareBody)) },
      responses: { '200': { description: 'The assignment', ...json(assignment) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/texts/{textId}/reference': {
    get: {
      summary: 'The text’s reference layer room (or null)',
      security: secured,
      parameters: [path('textId')],
      responses: { '200': { description: 'The reference', ...json(reference) }, ...errors(401, 404) },
    },
    put: {
      summary: 'Choose the text’s reference layer (owner, lead): their own, another coder’s, or a round’s consensus layer — any layer of the text they may read now; null clears it',
      security: secured,
      parameters: [path('textId')],
      requestBody: { required: true, ...json(toSchema(S.ReferenceBody)) },
      responses: { '200': { description: 'The reference', ...json(reference) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/supervision/settings': {
    get: { summary: 'Boundary tolerance (words) and drift threshold', security: secured, parameters: [path('studyId')], responses: { '200': { description: 'Settings', ...json(settings) }, ...errors(401, 404) } },
    put: {
      summary: 'Change the boundary tolerance and the drift threshold (owner, lead)',
      security: secured,
      parameters: [path('studyId')],
      requestBody: { required: true, ...json(toSchema(S.SupervisionSettingsBody)) },
      responses: { '200': { description: 'Settings', ...json(settings) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/supervision/progress': {
    get: {
      summary:
        'Each trainee’s agreement with the reference per revealed or closed round they took part in (the round’s statistic and unit; the reference is the text’s chosen reference, else the round’s consensus layer), the comparison categories counted, and a drift flag. Reflexive studies: counts only, no coefficient (owner, lead)',
      security: secured,
      parameters: [path('studyId')],
      responses: { '200': { description: 'Progress', ...json(progress) }, ...errors(401, 403, 404) },
    },
  },
};
