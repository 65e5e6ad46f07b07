/** OpenAPI paths of analysis (retrieval, tables) and exchange (exports, REFI-QDA imports); openapi.ts spreads them in. */
import { z } from 'zod';
import { RetrievalQuery, TablesQuery } from './analysis.js';

const secured = [{ session: [] }];
const err = { $ref: '#/components/schemas/Error' };
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { description: 'Error', ...json(err) }]));
const study = { name: 'studyId', in: 'path', required: true, schema: { type: 'string', format: 'uuid' } };
const queryParams = (s: z.ZodType) =>
  Object.entries(((z.toJSONSchema(s, { target: 'draft-2020-12', io: 'input' }) as { properties: Record<string, object> }).properties)).map(([name, schema]) => ({ name, in: 'query', required: false, schema }));
const importReport = {
  type: 'object',
  properties: {
    studyId: { type: 'string', format: 'uuid' },
    created: { type: 'boolean' },
    texts: { type: 'integer' },
    codes: { type: 'integer' },
    segments: { type: 'integer' },
    memos: { type: 'integer' },
    cases: { type: 'integer' },
    endReading: { type: 'string', enum: ['exclusive', 'inclusive'], description: 'How selection end positions were read' },
    warnings: { type: 'array', items: { type: 'string' } },
    coders: { type: 'array', items: { type: 'object', properties: { name: { type: 'string' }, email: { type: 'string' }, account: { type: 'string', enum: ['existing', 'created', 'importer'] } } } },
  },
};
const fileBody = {
  required: true,
  description: 'The .qdc (XML) or .qdpx (ZIP) file as the raw body, or multipart/form-data with a field "file".',
  content: { 'application/octet-stream': { schema: { type: 'string', format: 'binary' } }, 'multipart/form-data': { schema: { type: 'object', properties: { file: { type: 'string', format: 'binary' } } } } },
};
const importParams = [
  { name: 'format', in: 'query', required: true, schema: { type: 'string', enum: ['qdc', 'qdpx'] } },
  { name: 'end', in: 'query', required: false, description: 'Reading of endPosition: auto (default), exclusive or inclusive', schema: { type: 'string', enum: ['auto', 'exclusive', 'inclusive'] } },
];

export const exchangePaths = {
  '/api/studies/{studyId}/export': {
    get: {
      summary: 'Export the study (streamed attachment); owner and lead; audited before the first byte',
      security: secured,
      parameters: [
        study,
        { name: 'format', in: 'query', required: true, schema: { type: 'string', enum: ['csv', 'codebook-md', 'codebook-csv', 'memos-md', 'qdc', 'qdpx'] } },
        {
          name: 'layers',
          in: 'query',
          required: false,
          description: "coders (default): coders' layers outside rounds; consensus: the consensus layers of revealed or closed rounds, each as the coder \"Consensus, round N\" (csv only)",
          schema: { type: 'string', enum: ['coders', 'consensus'] },
        },
      ],
      responses: {
        '200': {
          description: 'The file: text/csv (RFC 4180, UTF-8 with BOM), text/markdown, application/xml (.qdc) or application/zip (.qdpx)',
          content: { 'text/csv': {}, 'text/markdown': {}, 'application/xml': {}, 'application/zip': {} },
        },
        ...errors(400, 401, 403, 404, 409),
      },
    },
  },
  '/api/studies/{studyId}/import': {
    post: {
      summary: 'Import a REFI-QDA codebook or project into the study (one transaction); owner and lead',
      security: secured,
      parameters: [study, ...importParams],
      requestBody: fileBody,
      responses: { '201': { description: 'Imported', ...json(importReport) }, ...errors(400, 401, 403, 404, 413, 422) },
    },
  },
  '/api/studies/import': {
    post: {
      summary: 'Import a REFI-QDA codebook or project into a new study owned by the caller',
      security: secured,
      parameters: [...importParams, { name: 'title', in: 'query', required: false, schema: { type: 'string' } }],
      requestBody: fileBody,
      responses: { '201': { description: 'Imported', ...json(importReport) }, ...errors(400, 401, 413, 422) },
    },
  },
  '/api/exchange/losses': {
    get: {
      summary: 'What the REFI-QDA standard cannot carry, to show before each export and import',
      responses: { '200': { description: 'Lists of sentences', ...json({ type: 'object' }) } },
    },
  },
  '/api/studies/{studyId}/retrieval': {
    get: {
      summary: 'Coded segments across the study, filtered, sorted and paged, each in its context; every member (layers they may read)',
      security: secured,
      parameters: [study, ...queryParams(RetrievalQuery)],
      responses: { '200': { description: '{total, offset, limit, items:[{id, textId, textTitle, coderId, coderName, kind (coder|consensus), codeId, codeLabel, start, end, quote, speaker, round, note, createdAt, context:{before, after}}]}', ...json({ type: 'object' }) }, ...errors(400, 401, 404) },
    },
  },
  '/api/studies/{studyId}/events': {
    get: {
      summary: 'Server-sent events for open screens: "ready", then "study" {action: texts-added|imported, textIds} when texts are uploaded or a REFI-QDA file is imported into the study (on any node); every member',
      security: secured,
      parameters: [study],
      responses: { '200': { description: 'text/event-stream', content: { 'text/event-stream': { schema: { type: 'string' } } } }, ...errors(401, 404) },
    },
  },
  '/api/studies/{studyId}/tables': {
    get: {
      summary: 'Code frequencies, co-occurrence, code by attribute (cases by default) or case by code, with the caution that frequency is not importance',
      security: secured,
      parameters: [study, ...queryParams(TablesQuery)],
      responses: { '200': { description: '{kind, rows, cols, cells, caution, attributes, cases, coders, texts, speakers, rounds:[{number, name, phase, consensus}]}', ...json({ type: 'object' }) }, ...errors(400, 401, 404) },
    },
  },
};
