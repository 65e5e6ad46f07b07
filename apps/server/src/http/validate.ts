/** Request bodies and parameters through zod; failures become 400 `invalid_body` with the issues listed. */
import type { Context } from 'hono';
import type { z } from 'zod';
import { HttpError } from '../errors.js';
import { isUuid } from '../ids.js';

export async function readJson<S extends z.ZodType>(c: Context, schema: S): Promise<z.infer<S>> {
  const type = c.req.header('content-type') ?? '';
  if (!/^application\/(?:[\w.+-]*\+)?json\b/i.test(type)) {
    throw new HttpError(415, 'bad_request', 'Send the body as JSON (Content-Type: application/json).');
  }
  let raw: unknown;
  try {
    raw = await c.req.json();
  } catch (err) {
    if (err instanceof HttpError) throw err;
    throw new HttpError(400, 'invalid_json', 'The body is not valid JSON.');
  }
  const parsed = schema.safeParse(raw);
  if (!parsed.success) {
    const issues = parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }));
    const first = issues[0];
    throw new HttpError(400, 'invalid_body', first ? `${first.path || 'body'}: ${first.message}` : 'Invalid body.', {}, issues);
  }
  return parsed.data;
}

/** A path id that must be a uuid; anything else cannot exist, so it is a 404 rather than a database error. */
export function idParam(c: Context, name: string, what: string): string {
  const value = c.req.param(name) ?? '';
  if (!isUuid(value)) throw new HttpError(404, 'not_found', `${what} not found.`);
  return value.toLowerCase();
}

/** Query parameters through zod; a failure is a 400 naming the first parameter at fault. */
export function readQuery<S extends z.ZodType>(c: Context, schema: S): z.infer<S> {
  const parsed = schema.safeParse(c.req.query());
  if (!parsed.success) {
    const i = parsed.error.issues[0]!;
    throw new HttpError(400, 'bad_request', `${i.path.join('.') || 'query'}: ${i.message}`);
  }
  return parsed.data;
}
