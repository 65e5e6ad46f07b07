/** OpenAPI paths of first run, invitations, password changes and resets, and the import preview; openapi.ts spreads them in. */
import { z } from 'zod';
import { AcceptInvitationBody, ChangePasswordBody, ResetPasswordBody } from './account-links.js';
import { NewInvitationBody } from './invitations.js';
import { SetupBody } from './setup.js';

const secured = [{ session: [] }];
const err = { $ref: '#/components/schemas/Error' };
const json = (schema: object) => ({ content: { 'application/json': { schema } } });
const errors = (...codes: number[]) => Object.fromEntries(codes.map((c) => [String(c), { description: ERRORS[c] ?? 'Error', ...json(err) }]));
const uuid = (name: string) => ({ name, in: 'path', required: true, schema: { type: 'string', format: 'uuid' } });
const token = { name: 'token', in: 'path', required: true, description: 'The token from the link (32 base32 characters)', schema: { type: 'string' } };
const toSchema = (s: z.ZodType) => {
  const { $schema: _drop, ...rest } = z.toJSONSchema(s, { target: 'draft-2020-12', io: 'input' }) as Record<string, unknown>;
  return rest;
};
/** A required JSON request body from a zod schema (also used by the other openapi-*.ts files). */
export const body = (s: z.ZodType) => ({ required: true, ...json(toSchema(s)) });
const obj = (properties: Record<string, object>) => ({ type: 'object', properties });
const str = { type: 'string' };
const when = { type: 'string', format: 'date-time' };

const ERRORS: Record<number, string> = {
  400: 'Invalid body',
  401: 'Not signed in, or a wrong password',
  403: 'Role does not allow it (or bad_setup_code, bad_origin)',
  404: 'Unknown link, study or member',
  409: 'already_set_up: an account exists',
  410: 'link_used or link_expired: each link works once, until its time',
  422: 'The importer could not read the file: details {format, line, column}',
  429: 'Too many failed attempts; see Retry-After',
};

const link = obj({ token: str, path: { type: 'string', description: 'Append to the site origin: the link to send' }, expiresAt: when });

export const peoplePaths = {
  '/api/setup': {
    get: { summary: 'Whether this server waits for its first account', responses: { '200': { description: 'needed: true on an empty database', ...json(obj({ needed: { type: 'boolean' } })) } } },
    post: {
      summary: 'Create the owner account with the one-time set-up code printed in the server terminal; signs in',
      requestBody: body(SetupBody),
      responses: { '201': { description: 'Created and signed in', ...json(obj({ id: str, email: str, name: str, expiresAt: when })) }, ...errors(400, 403, 409, 429) },
    },
  },
  '/api/me/password': {
    put: {
      summary: 'Change one’s own password; ends every other session of the account',
      security: secured,
      requestBody: body(ChangePasswordBody),
      responses: { '204': { description: 'Changed' }, ...errors(400, 401, 403) },
    },
  },
  '/api/studies/{studyId}/invitations': {
    get: {
      summary: 'Invitations not yet used; owner and lead',
      security: secured,
      parameters: [uuid('studyId')],
      responses: { '200': { description: 'Pending', ...json({ type: 'array', items: obj({ id: str, email: str, role: str, createdAt: when, expiresAt: when, expired: { type: 'boolean' } }) }) }, ...errors(401, 403, 404) },
    },
    post: {
      summary: 'Invite by email with a role: a single-use link valid 7 days, shown once; owner and lead (owner role by owners)',
      security: secured,
      parameters: [uuid('studyId')],
      requestBody: body(NewInvitationBody),
      responses: { '201': { description: 'The link to copy', ...json(link) }, ...errors(400, 401, 403, 404) },
    },
  },
  '/api/studies/{studyId}/invitations/{invitationId}': {
    delete: { summary: 'Withdraw an unused invitation', security: secured, parameters: [uuid('studyId'), uuid('invitationId')], responses: { '204': { description: 'Withdrawn' }, ...errors(401, 403, 404) } },
  },
  '/api/studies/{studyId}/members/{userId}/reset-link': {
    post: {
      summary: 'A single-use password-reset link for a member, valid 24 hours; owner',
      security: secured,
      parameters: [uuid('studyId'), uuid('userId')],
      responses: { '201': { description: 'The link to copy', ...json(link) }, ...errors(401, 403, 404) },
    },
  },
  '/api/invitations/{token}': {
    get: {
      summary: 'What an invitation offers (no sign-in needed)',
      parameters: [token],
      responses: { '200': { description: 'The invitation', ...json(obj({ email: str, role: str, studyId: str, studyTitle: str, expiresAt: when, accountExists: { type: 'boolean' } })) }, ...errors(404, 410) },
    },
  },
  '/api/invitations/{token}/accept': {
    post: {
      summary: 'Accept: a new account (name, password), or the password of the existing account with that email; joins and signs in',
      parameters: [token],
      requestBody: body(AcceptInvitationBody),
      responses: { '200': { description: 'Joined and signed in', ...json(obj({ id: str, email: str, name: str, studyId: str, role: str, expiresAt: when })) }, ...errors(400, 401, 404, 410, 429) },
    },
  },
  '/api/password-resets/{token}': {
    get: { summary: 'Whose password a reset link sets', parameters: [token], responses: { '200': { description: 'The link', ...json(obj({ email: str, expiresAt: when })) }, ...errors(404, 410) } },
    post: {
      summary: 'Set a new password with a reset link; ends every session of the account',
      parameters: [token],
      requestBody: body(ResetPasswordBody),
      responses: { '204': { description: 'Set' }, ...errors(400, 404, 410) },
    },
  },
  '/api/studies/{studyId}/texts/import/preview': {
    post: {
      summary: 'What importing this file would make (turns, speakers, times, the first turns), committing nothing; owner and lead',
      security: secured,
      parameters: [uuid('studyId'), { name: 'filename', in: 'query', required: false, schema: str }],
      requestBody: { required: true, content: { 'multipart/form-data': { schema: obj({ file: { type: 'string', format: 'binary' }, title: str }) }, 'application/octet-stream': { schema: { type: 'string', format: 'binary' } } } },
      responses: {
        '200': {
          description: 'The preview',
          ...json(
            obj({
              filename: str,
              format: { type: 'string', enum: ['txt', 'vtt', 'srt', 'docx'] },
              title: str,
              turnCount: { type: 'integer' },
              wordCount: { type: 'integer' },
              speakers: { type: 'array', items: obj({ label: str, turns: { type: 'integer' }, words: { type: 'integer' } }) },
              unlabelledTurns: { type: 'integer' },
              timestamps: { oneOf: [{ type: 'null' }, obj({ firstMs: { type: 'integer' }, lastMs: { type: 'integer' } })] },
              turns: { type: 'array', items: obj({ speaker: { type: ['string', 'null'] }, startMs: { type: ['integer', 'null'] }, endMs: { type: ['integer', 'null'] }, text: str }) },
            }),
          ),
        },
        ...errors(400, 401, 403, 404, 413, 422),
      },
    },
  },
};
