/** OpenAPI paths of de-identification (owner, lead) and the pseudonym key (owner); openapi.ts spreads them in. */
import { ApplyBody, CandidatesBody } from './deid.js';
import { body } from './openapi-people.js';

const secured = [{ session: [] }];
const err = { $ref: '#/components/schemas/Error' };
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { description: ERRORS[c] ?? 'Error', ...json(err) }]));
const studyId = [{ name: 'studyId', in: 'path', required: true, schema: { type: 'string', format: 'uuid' } }];
const obj = (properties: Record<string, object>) => ({ type: 'object', properties });
const str = { type: 'string' };
const int = { type: 'integer' };
const strs = { type: 'array', items: str };

const ERRORS: Record<number, string> = {
  400: 'Invalid body',
  401: 'Not signed in',
  403: 'Role does not allow it (de-identification: owner and lead; the key: owner)',
  404: 'Unknown study',
  409: 'The key was exported already (it may be exported once)',
};

const scan = obj({ occurrences: int, byTable: { type: 'object', additionalProperties: int }, tablesScanned: int });
const candidate = obj({ original: str, kind: str, occurrences: int, textIds: strs, where: { ...strs, description: "'texts', 'codebook', 'memos', 'segment notes', 'comments', 'text titles', 'study details', 'round names'" }, context: str, suggestion: str });
const counts = obj({ codebook: int, memos: int, notes: int, comments: int, titles: int, study: int, rounds: int, audit: int });
const room = obj({ kind: str, textId: { type: ['string', 'null'] }, oldRoom: str, newRoom: str });

export const deidPaths = {
  '/api/studies/{studyId}/deid/candidates': {
    post: {
      summary: 'Candidate identifiers in every text, the codebook, memos and replies, segment notes, comments, text titles, the study’s details and its rounds’ names, each with where it was found and a pseudonym',
      security: secured,
      parameters: studyId,
      requestBody: body(CandidatesBody),
      responses: { '200': { description: 'Candidates', ...json(obj({ texts: { type: 'array', items: obj({ id: str, title: str }) }, candidates: { type: 'array', items: candidate } })) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/deid/apply': {
    post: {
      summary: 'Apply accepted replacements everywhere in the study (segments, examples and jottings stay on their words); recorded in the key and the audit log',
      security: secured,
      parameters: studyId,
      requestBody: body(ApplyBody),
      responses: { '200': { description: 'What was replaced', ...json(obj({ occurrences: int, texts: int, segmentsMoved: int, elsewhere: counts })) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/deid/purge': {
    post: {
      summary: 'Rebuild every document of the study under new rooms without its history; old log, snapshots and named versions deleted; open copies told 4410; then the scan',
      security: secured,
      parameters: studyId,
      responses: {
        '200': {
          description: 'The rebuilt rooms and the scan',
          ...json(obj({ texts: { type: 'array', items: obj({ textId: str, oldRoom: str, newRoom: str, layers: int }) }, documents: { type: 'array', items: room }, referencesMoved: int, scan, keyEntries: int })),
        },
        ...errors(401, 403, 404),
      },
    },
  },
  '/api/studies/{studyId}/deid/scan': {
    get: { summary: 'Rows of the study, in every table, still holding an original of the key', security: secured, parameters: studyId, responses: { '200': { description: 'The scan', ...json(obj({ scan, keyEntries: int })) }, ...errors(401, 403, 404) } },
  },
  '/api/studies/{studyId}/pseudonyms': {
    get: {
      summary: 'The pseudonym key; owner only',
      security: secured,
      parameters: studyId,
      responses: { '200': { description: 'The key', ...json(obj({ entries: { type: 'array', items: obj({ kind: str, original: str, pseudonym: str, createdAt: str }) }, exportedAt: { type: ['string', 'null'] } })) }, ...errors(401, 403, 404) },
    },
    delete: { summary: 'Delete the pseudonym key; owner only', security: secured, parameters: studyId, responses: { '204': { description: 'Deleted' }, ...errors(401, 403, 404) } },
  },
  '/api/studies/{studyId}/pseudonyms/export': {
    post: {
      summary: 'The key as CSV (RFC 4180), once; owner only',
      security: secured,
      parameters: studyId,
      responses: { '200': { description: 'CSV', content: { 'text/csv': { schema: str } } }, ...errors(401, 403, 404, 409) },
    },
  },
};
