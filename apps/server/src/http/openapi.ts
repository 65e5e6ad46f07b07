/**
 * GET /api/openapi.json: an OpenAPI 3.1 description built from the same zod schemas the routes
 * validate with (zod 4's toJSONSchema emits JSON Schema 2020-12, the dialect OpenAPI 3.1 uses).
 */
import { Hono } from 'hono';
import { z } from 'zod';
import type { AppEnv } from './context.js';
import * as S from './schemas.js';
import { codingPaths } from './openapi-coding.js';
import { exchangePaths } from './openapi-exchange.js';
import { peoplePaths } from './openapi-people.js';
import { deidPaths } from './openapi-deid.js';
import { roundPaths, roundSchemas } from './openapi-rounds.js';
import { supervisionPaths } from './openapi-supervision.js';

const components = {
  AddMemberBody: S.AddMemberBody,
  AuditEntry: S.AuditEntry,
  UpdateStudyBody: S.UpdateStudyBody,
  ChangeRoleBody: S.ChangeRoleBody,
  Error: S.ErrorResponse,
  Health: S.Health,
  Me: S.Me,
  Member: S.Member,
  NewStudyBody: S.NewStudyBody,
  NewTextBody: S.NewTextBody,
  SignInBody: S.SignInBody,
  Study: S.Study,
  StudySummary: S.StudySummary,
  TextDetail: S.TextDetail,
  TextSummary: S.TextSummary,
  ...roundSchemas,
};
type Name = keyof typeof components;

const ref = (name: Name) => ({ $ref: `#/components/schemas/${name}` });
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const ok = (name: Name | null, description: string, status = '200') => ({
  [status]: name ? { description, ...json(ref(name)) } : { description },
});
const list = (name: Name, description: string) => ({ '200': { description, ...json({ type: 'array', items: ref(name) }) } });
const errors = (...codes: number[]) =>
  Object.fromEntries(codes.map((code) => [String(code), { description: ERROR_TEXT[code] ?? 'Error', ...json(ref('Error')) }]));
const body = (name: Name) => ({ required: true, ...json(ref(name)) });
const idParam = (name: string) => ({ name, in: 'path', required: true, schema: { type: 'string', format: 'uuid' } });

const ERROR_TEXT: Record<number, string> = {
  400: 'Invalid body (code invalid_body or invalid_json)',
  401: 'Not signed in, or wrong email or password',
  403: 'Role does not allow it, or the Origin check failed (bad_origin)',
  404: 'Not found, or not a member',
  409: 'Conflict (last_owner)',
  413: 'Body too large',
  415: 'Body is not JSON',
  429: 'Too many failed sign-ins; see Retry-After',
};

export function buildOpenApi() {
  const schemas = Object.fromEntries(
    Object.entries(components).map(([name, schema]) => {
      const { $schema: _drop, ...rest } = z.toJSONSchema(schema, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>;
      return [name, rest];
    }),
  );
  const secured = [{ session: [] }];
  return {
    openapi: '3.1.0',
    info: {
      title: 'Gloss API',
      version: '0.1.0',
      description:
        'Cookie-authenticated JSON API. State-changing requests that carry the session cookie must send an Origin (or Referer) of this site. ' +
        'Every error is {"error":{"code","message"}}. Documents are edited over the y-websocket protocol at /sync/<room>.',
    },
    components: {
      schemas,
      securitySchemes: { session: { type: 'apiKey', in: 'cookie', name: 'gloss_session' } },
    },
    paths: {
      '/api/health': { get: { summary: 'Ready (200) or still starting (503, naming what it waits for); connection counts for study owners', responses: { ...ok('Health', 'Up'), ...errors(503) } } },
      '/api/openapi.json': { get: { summary: 'This description', responses: { '200': { description: 'OpenAPI 3.1 document' } } } },
      '/api/session': {
        post: {
          summary: 'Sign in; sets the session cookie',
          requestBody: body('SignInBody'),
          responses: { ...ok('Me', 'Signed in'), ...errors(400, 401, 415, 429) },
        },
        delete: { summary: 'Sign out', security: secured, responses: { '204': { description: 'Signed out' }, ...errors(403) } },
      },
      '/api/me': { get: { summary: 'The signed-in user', security: secured, responses: { ...ok('Me', 'Signed in'), ...errors(401) } } },
      '/api/studies': {
        get: { summary: 'Studies the caller belongs to', security: secured, responses: { ...list('StudySummary', 'Studies'), ...errors(401) } },
        post: {
          summary: 'Create a study (the caller becomes its owner)',
          security: secured,
          requestBody: body('NewStudyBody'),
          responses: { ...ok('Study', 'Created', '201'), ...errors(400, 401, 403) },
        },
      },
      '/api/studies/{studyId}': {
        get: {
          summary: 'A study, with the rooms of its codebook and memos documents',
          security: secured,
          parameters: [idParam('studyId')],
          responses: { ...ok('Study', 'The study'), ...errors(401, 404) },
        },
        patch: {
          summary: 'Change title, description, mode, retention date or ethics note, or archive (archived: true); owner',
          security: secured,
          parameters: [idParam('studyId')],
          requestBody: body('UpdateStudyBody'),
          responses: { ...ok('Study', 'Changed'), ...errors(400, 401, 403, 404) },
        },
        delete: {
          summary:
            'Delete the study and every row of it in one transaction (texts, documents with their update log, snapshots and versions, projections, ' +
            'memos, comments, rounds, cases, the pseudonym key, its audit log); one audit entry of ids and counts remains. Open sync connections of ' +
            'its documents close with 4404. Owner.',
          security: secured,
          parameters: [idParam('studyId')],
          responses: { '204': { description: 'Deleted' }, ...errors(401, 403, 404) },
        },
      },
      '/api/studies/{studyId}/audit': {
        get: {
          summary: 'Access and change log of the study, newest first; owner and lead',
          security: secured,
          parameters: [
            idParam('studyId'),
            { name: 'limit', in: 'query', required: false, schema: { type: 'integer', minimum: 1, maximum: 500, default: 100 } },
            { name: 'before', in: 'query', required: false, description: 'Only entries with a smaller id (paging)', schema: { type: 'integer', minimum: 1 } },
            { name: 'action', in: 'query', required: false, description: 'One action (member.invite) or a family ending in a dot (member.)', schema: { type: 'string' } },
            { name: 'userId', in: 'query', required: false, description: 'Only what this person did', schema: { type: 'string', format: 'uuid' } },
            { name: 'from', in: 'query', required: false, description: 'Not before this time (ISO 8601)', schema: { type: 'string' } },
            { name: 'to', in: 'query', required: false, description: 'Not after this time (ISO 8601)', schema: { type: 'string' } },
          ],
          responses: { ...list('AuditEntry', 'Entries'), ...errors(400, 401, 403, 404) },
        },
      },
      '/api/studies/{studyId}/members': {
        get: { summary: 'Members', security: secured, parameters: [idParam('studyId')], responses: { ...list('Member', 'Members'), ...errors(401, 404) } },
        post: {
          summary: 'Add someone by email; owner and lead. A current member: their role changes (200, the member). Anyone else: an invitation link to copy (202, as POST …/invitations answers plus invited:true), whether or not the email has an account here — the answer never tells',
          security: secured,
          parameters: [idParam('studyId')],
          requestBody: body('AddMemberBody'),
          responses: { ...ok('Member', 'Role changed'), ...ok(null, 'Invited: {invited, id, email, role, expiresAt, token, path}', '202'), ...errors(400, 401, 403, 404, 409) },
        },
      },
      '/api/studies/{studyId}/members/{userId}': {
        patch: {
          summary: "Change a member's role; owner and lead (owner role only by owners)",
          security: secured,
          parameters: [idParam('studyId'), idParam('userId')],
          requestBody: body('ChangeRoleBody'),
          responses: { ...ok('Member', 'Changed'), ...errors(400, 401, 403, 404, 409) },
        },
        delete: {
          summary: 'Remove a member; owner and lead',
          security: secured,
          parameters: [idParam('studyId'), idParam('userId')],
          responses: { '204': { description: 'Removed' }, ...errors(401, 403, 404, 409) },
        },
      },
      '/api/studies/{studyId}/texts': {
        get: { summary: 'Texts of a study', security: secured, parameters: [idParam('studyId')], responses: { ...list('TextSummary', 'Texts'), ...errors(401, 404) } },
        post: {
          summary: 'Add a plain-text transcript; owner and lead',
          security: secured,
          parameters: [idParam('studyId')],
          requestBody: body('NewTextBody'),
          responses: { ...ok('TextSummary', 'Added', '201'), ...errors(400, 401, 403, 404, 413) },
        },
      },
      '/api/texts/{textId}': {
        get: {
          summary:
            "A text's room and the layer rooms the caller may open (creates the caller's own layer on first open). Layers outside rounds and those of the open round the text is in; each says its round (id or null) and kind (coder or consensus). `round` names that open round and whether the caller takes part.",
          security: secured,
          parameters: [idParam('textId')],
          responses: { ...ok('TextDetail', 'The text'), ...errors(401, 404) },
        },
        delete: {
          summary:
            'Delete the text and every row of it in one transaction (its documents, update log, snapshots, versions, layers, segments, comments, ' +
            'rounds\' rows for it, case links); earlier audit entries about it lose their details. Open sync connections close with 4404. Owner, lead.',
          security: secured,
          parameters: [idParam('textId')],
          responses: { '204': { description: 'Deleted' }, ...errors(401, 403, 404) },
        },
      },
      '/api/texts/{textId}/opening': {
        get: {
          summary:
            'Everything the coding view of a text opens, in one response before any sync socket: the states (whole-document Yjs updates) of the text, of every layer of it ' +
            'the caller may read (outside rounds and of the open round), and of the study\'s codebook and memos, decided room by room by the same rule as the sync upgrade ' +
            '(a participant in an independent phase gets no one else\'s layer). Binary: varUint version (1), varString ticket, varUint count, then per document varString room, ' +
            'varString kind, varUint8Array state (lib0 encoding). Brotli or gzip as Accept-Encoding allows. The ticket, presented as `/sync/<room>?ticket=…` with the same ' +
            'session cookie within 30 seconds, opens the rooms it names without deciding them again, as long as no access change happened meanwhile (else the upgrade decides afresh). ' +
            'With `sv` (base64url of varUint count, then per room varString room, varUint8Array Yjs state vector: the copies the device keeps) the answer is version 2: ' +
            'a granted room named in `sv` comes as what it gained since that state vector (a few bytes when unchanged), and after each state a varUint (1: such a difference, ' +
            '0: the whole document) and varUint8Array the state vector the copy then holds. The rooms given are decided exactly as without it; the memos always come whole.',
          security: secured,
          parameters: [
            idParam('textId'),
            { name: 'sv', in: 'query', required: false, description: 'The state vectors of the copies this device keeps, by room (base64url; see above).', schema: { type: 'string' } },
          ],
          responses: { '200': { description: 'The states', content: { 'application/octet-stream': { schema: { type: 'string', format: 'binary' } } } }, ...errors(400, 401, 404) },
        },
      },
      ...codingPaths,
      ...exchangePaths,
      ...peoplePaths,
      ...deidPaths,
      ...roundPaths,
      ...supervisionPaths,
    },
  };
}

export function openApiRoutes() {
  const doc = buildOpenApi();
  return new Hono<AppEnv>().get('/openapi.json', (c) => c.json(doc));
}
