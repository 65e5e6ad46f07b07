/**
 * GET /api/setup — whether this server still waits for its first account.
 * POST /api/setup {code, email, name, password} — creates the owner account with the set-up code
 * printed in the server's terminal and signs this browser in (201). Wrong codes count as failed
 * sign-ins (rate limited per address); once any account exists the answer is 409 `already_set_up`.
 */
import { Hono } from 'hono';
import { z } from 'zod';
import { HttpError } from '../errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { clientAddress, tooMany } from './middleware.js';
import { beginSession } from './session.js';
import { readJson } from './validate.js';

export const SetupBody = z.object({
  code: z.string().trim().min(1).max(64),
  email: z.string().trim().min(3).max(320),
  name: z.string().trim().min(1).max(200),
  password: z.string().min(1).max(1024),
});

export function setupRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();

  app.get('/', async (c) => {
    const open = deps.firstRun ? await deps.firstRun.open() : false;
    return c.json({ needed: open });
  });

  app.post('/', async (c) => {
    const body = await readJson(c, SetupBody);
    const firstRun = deps.firstRun;
    if (!firstRun || !(await firstRun.open())) {
      throw new HttpError(409, 'already_set_up', 'This server is set up already: sign in, or ask an owner for an invitation.');
    }
    const begun = deps.signInLimiter.begin([{ key: `setup|${clientAddress(c, deps.config.trustProxy)}`, max: deps.config.signInMaxFailures }]);
    if (!begun.allowed) throw tooMany(begun, 'set-up codes');
    const user = await firstRun.claim(body.code, { email: body.email, name: body.name, password: body.password }).catch((err: unknown) => {
      // Only a wrong code counts against the limit.
      if (!(err instanceof HttpError && err.code === 'bad_setup_code')) begun.succeeded();
      throw err;
    });
    begun.succeeded();
    const expiresAt = await beginSession(deps, c, user.id);
    return c.json({ ...user, expiresAt: expiresAt.toISOString() }, 201);
  });

  return app;
}
