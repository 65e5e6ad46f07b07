/**
 * The web app's built files at `/`, with unknown paths falling back to index.html (client-side
 * routes). When the folder has not been built, `/` explains how to build it.
 */
import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { serveStatic } from '@hono/node-server/serve-static';
import { Hono } from 'hono';
import type { AppEnv } from './context.js';

const NOT_BUILT = (dir: string) => `<!doctype html>
<html lang="en"><meta charset="utf-8"><title>Gloss</title>
<body style="font-family:system-ui;max-width:40rem;margin:3rem auto">
<h1>Gloss server is running</h1>
<p>The web app has not been built: no files in <code>${dir.replace(/[<>&]/g, '')}</code>.</p>
<p>Build it with <code>pnpm --filter @gloss/web build</code> and reload. The JSON API is at <a href="/api/health">/api/health</a>.</p>
</body></html>`;

export function staticRoutes(webDist: string) {
  const app = new Hono<AppEnv>();
  const index = join(webDist, 'index.html');
  app.use('*', async (c, next) => {
    if (!existsSync(index)) return next();
    return serveStatic<AppEnv>({ root: webDist })(c, next);
  });
  app.get('*', (c) => {
    // SPA fallback; read each time so a rebuild shows without a restart.
    if (existsSync(index)) return c.html(readFileSync(index, 'utf8'));
    return c.html(NOT_BUILT(webDist), 200);
  });
  return app;
}
