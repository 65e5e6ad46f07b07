/** OpenAPI paths of the coding-model endpoints (segments, import, versions, agreement); openapi.ts spreads them in. */
import { z } from 'zod';
import { AgreementQuery } from './agreement.js';
import { ComparisonQuery } from './comparison.js';
import { NewThreadBody, ReplyBody } from './comments.js';
import { NewVersionBody } from './versions.js';

const secured = [{ session: [] }];
const err = { $ref: '#/components/schemas/Error' };
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { description: 'Error', ...json(err) }]));
const path = (name: string) => ({ name, in: 'path', required: true, schema: { type: 'string', format: 'uuid' } });
const toSchema = (s: z.ZodType) => {
  const { $schema: _drop, ...rest } = z.toJSONSchema(s, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>;
  return rest;
};

const segment = {
  type: 'object',
  required: ['id', 'coderId', 'codeId', 'start', 'end', 'quote', 'flags'],
  properties: {
    id: { type: 'string' },
    coderId: { type: 'string', format: 'uuid' },
    codeId: { type: 'string' },
    start: { type: 'integer', description: 'UTF-16 offset into the current text' },
    end: { type: 'integer' },
    quote: { type: 'string' },
    flags: { type: 'array', items: { type: 'string', enum: ['disagreement', 'exclusive', 'duplicate', 'retired-code', 'orphaned', 'definition-race', 'stale-definition'] } },
  },
};
const version = {
  type: 'object',
  properties: { id: { type: 'string', format: 'uuid' }, name: { type: 'string' }, createdAt: { type: 'string' }, createdBy: { type: ['object', 'null'] } },
};
const queryParams = (s: z.ZodType) =>
  Object.entries((toSchema(s) as { properties: Record<string, object>; required?: string[] }).properties).map(([name, schema]) => ({
    name,
    in: 'query',
    required: ((toSchema(s) as { required?: string[] }).required ?? []).includes(name),
    schema,
  }));
const agreementParams = queryParams(AgreementQuery);
const commentOut = {
  type: 'object',
  properties: { id: { type: 'string', format: 'uuid' }, author: { type: 'object' }, body: { type: 'string' }, createdAt: { type: 'string' } },
};
const thread = {
  type: 'object',
  properties: {
    ...commentOut.properties,
    textId: { type: 'string', format: 'uuid' },
    layer: { type: 'string', format: 'uuid' },
    coderId: { type: 'string', format: 'uuid' },
    segmentId: { type: 'string' },
    quote: { type: ['string', 'null'] },
    resolvedAt: { type: ['string', 'null'] },
    resolvedBy: { type: ['string', 'null'] },
    replies: { type: 'array', items: commentOut },
  },
};
const comparisonEntry = {
  type: 'object',
  required: ['start', 'end', 'quote', 'codeIds', 'reference', 'layer'],
  properties: {
    start: { type: 'integer' },
    end: { type: 'integer' },
    quote: { type: 'string' },
    codeIds: { type: 'array', items: { type: 'string' } },
    reference: { type: ['object', 'null'] },
    layer: { type: 'array', items: { type: 'object' } },
    startShiftWords: { type: 'integer' },
    endShiftWords: { type: 'integer' },
  },
};
const person = { type: 'object', required: ['id', 'name'], properties: { id: { type: 'string', format: 'uuid' }, name: { type: 'string' } } };
/** The report's fields about who was compared (agreement/coders.ts); the figures' blocks are described in prose. */
const agreementReport = {
  type: 'object',
  required: ['studyId', 'mode', 'unit', 'coders', 'coderRule', 'textCoders', 'texts', 'codes'],
  properties: {
    studyId: { type: 'string', format: 'uuid' },
    mode: { type: 'string' },
    unit: { type: 'string' },
    coders: { type: 'array', items: person, description: 'Everyone compared: the coders= list, else whoever is counted on at least one text' },
    coderRule: {
      type: 'object',
      required: ['rule', 'description'],
      properties: {
        rule: { type: 'string', enum: ['listed', 'participants', 'applied-codes'], description: 'applied-codes (default): on each text, whoever applied at least one code there; listed: the coders= list' },
        description: { type: 'string' },
      },
    },
    textCoders: {
      type: 'array',
      description: 'Per text, who was counted as a coder and who was left out and why',
      items: {
        type: 'object',
        required: ['textId', 'counted', 'leftOut'],
        properties: {
          textId: { type: 'string', format: 'uuid' },
          counted: { type: 'array', items: person },
          leftOut: {
            type: 'array',
            items: {
              type: 'object',
              required: ['id', 'name', 'reason', 'message'],
              properties: {
                id: { type: 'string', format: 'uuid' },
                name: { type: 'string' },
                reason: { type: 'string', enum: ['no-codes', 'not-listed', 'not-participant', 'no-layer'] },
                message: { type: 'string', description: 'In plain words, e.g. "not counted: no codes applied"' },
              },
            },
          },
        },
      },
    },
    texts: { type: 'array', items: { type: 'object', properties: { id: { type: 'string' }, title: { type: 'string' } } } },
    codes: { type: 'array', items: { type: 'object', properties: { id: { type: 'string' }, label: { type: 'string' } } } },
    statistic: { type: 'string' },
    method: { type: 'string' },
    pooled: { type: 'object' },
    perCode: { type: 'array', items: { type: 'object' } },
    perText: { type: 'array', items: { type: 'object' } },
    perCoderPair: { type: 'array', items: { type: 'object' } },
    coefficients: { type: 'null', description: 'Reflexive mode only' },
    differences: { type: 'array', items: { type: 'object' }, description: 'Reflexive mode only' },
  },
};

export const codingPaths = {
  '/api/texts/{textId}/comments': {
    get: {
      summary: 'Comment threads on the segments of every layer the caller may read',
      security: secured,
      parameters: [path('textId')],
      responses: { '200': { description: '{"threads":[…]} oldest first, each with its replies', ...json({ type: 'object', properties: { threads: { type: 'array', items: thread } } }) }, ...errors(401, 404) },
    },
    post: {
      summary: 'Start a thread on a segment ({"layer","segmentId","body"}) or reply ({"parentId","body"}); the author is the signed-in person',
      security: secured,
      parameters: [path('textId')],
      requestBody: { required: true, ...json({ oneOf: [toSchema(NewThreadBody), toSchema(ReplyBody)] }) },
      responses: { '201': { description: 'The new comment and its whole thread', ...json({ type: 'object' }) }, ...errors(400, 401, 404) },
    },
  },
  '/api/comments/{commentId}/resolve': {
    post: {
      summary: "Mark a thread resolved: its starter, the segment's coder, a lead or the owner",
      security: secured,
      parameters: [path('commentId')],
      responses: { '200': { description: '{"thread"}', ...json({ type: 'object', properties: { thread } }) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/comments/{commentId}/reopen': {
    post: {
      summary: 'Re-open a resolved thread (same people as resolve)',
      security: secured,
      parameters: [path('commentId')],
      responses: { '200': { description: '{"thread"}', ...json({ type: 'object', properties: { thread } }) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/feedback': {
    get: {
      summary: 'Feedback for me: threads on my segments started by others, and threads I wrote in that others answered',
      security: secured,
      parameters: [path('studyId')],
      responses: { '200': { description: '{"threads":[…]} with textTitle', ...json({ type: 'object' }) }, ...errors(401, 404) },
    },
  },
  '/api/studies/{studyId}/comments/events': {
    get: {
      summary: 'Server-sent events: "ready", then "comment" {action: added|resolved|reopened, textId, threadId, commentId} for layers the caller may read',
      security: secured,
      parameters: [path('studyId')],
      responses: { '200': { description: 'text/event-stream', content: { 'text/event-stream': { schema: { type: 'string' } } } }, ...errors(401, 404) },
    },
  },
  '/api/texts/{textId}/comparison': {
    get: {
      summary: 'One layer against a reference layer of the same text: missed, extra, other code, other boundary (each with start, end, quote, codeIds), counts per code',
      security: secured,
      parameters: [path('textId'), ...queryParams(ComparisonQuery)],
      responses: {
        '200': {
          description: 'The comparison; offsets are UTF-16 into the current text',
          ...json({
            type: 'object',
            required: ['missed', 'extra', 'otherCode', 'otherBoundary', 'counts', 'toleranceWords'],
            properties: Object.fromEntries(['missed', 'extra', 'otherCode', 'otherBoundary'].map((k) => [k, { type: 'array', items: comparisonEntry }])),
          }),
        },
        ...errors(400, 401, 404),
      },
    },
  },
  '/api/texts/{textId}/segments': {
    get: {
      summary: 'Segments of every layer the caller may see, resolved from the current documents, with their flags',
      security: secured,
      parameters: [path('textId')],
      responses: { '200': { description: 'Segments, ordered by start', ...json({ type: 'array', items: segment }) }, ...errors(401, 404) },
    },
  },
  '/api/studies/{studyId}/texts/import': {
    post: {
      summary: 'Import a transcript file (txt, vtt, srt, docx); owner and lead. Accept: application/x-ndjson streams {"progress"} lines then {"text"}',
      security: secured,
      parameters: [
        path('studyId'),
        { name: 'filename', in: 'query', required: false, schema: { type: 'string' }, description: 'Required with a raw body' },
        { name: 'title', in: 'query', required: false, schema: { type: 'string' } },
      ],
      requestBody: {
        required: true,
        content: {
          'multipart/form-data': { schema: { type: 'object', properties: { file: { type: 'string', format: 'binary' }, title: { type: 'string' } }, required: ['file'] } },
          'application/octet-stream': { schema: { type: 'string', format: 'binary' } },
        },
      },
      responses: {
        '201': { description: 'Created', ...json({ $ref: '#/components/schemas/TextSummary' }) },
        '200': { description: 'NDJSON stream', content: { 'application/x-ndjson': { schema: { type: 'string' } } } },
        '422': { description: 'The importer refused the file; details give format, line and column', ...json(err) },
        ...errors(400, 401, 403, 404, 413),
      },
    },
  },
  '/api/documents/{room}/versions': {
    get: { summary: 'Named versions of a text or codebook document', security: secured, parameters: [path('room')], responses: { '200': { description: 'Versions', ...json({ type: 'array', items: version }) }, ...errors(400, 401, 403, 404) } },
    post: {
      summary: 'Name the current state of a text or codebook document; whoever may edit it (owner, lead). Audited',
      security: secured,
      parameters: [path('room')],
      requestBody: { required: true, ...json(toSchema(NewVersionBody)) },
      responses: { '201': { description: 'Created', ...json(version) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/documents/{room}/versions/{versionId}': {
    get: {
      summary: 'A version read-only (text and turns, or codebook entries) and its comparison with the current state',
      security: secured,
      parameters: [path('room'), path('versionId')],
      responses: { '200': { description: 'The version' }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/agreement': {
    get: {
      summary: 'Intercoder agreement (pooled, per code, per text, per coder pair); owner, lead, observer; reflexive studies get differences instead. Audited',
      security: secured,
      parameters: [path('studyId'), ...agreementParams],
      responses: { '200': { description: 'The report', ...json(agreementReport) }, ...errors(400, 401, 403, 404) },
    },
  },
};
