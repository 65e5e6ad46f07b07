/** The web app's files at /, SPA fallback to index.html, and a helpful page when nothing is built. */
import { mkdtempSync, mkdirSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { staticRoutes } from './static.js';

describe('static web app', () => {
  const dist = mkdtempSync(join(tmpdir(), 'gloss-dist-'));
  mkdirSync(join(dist, 'assets'));
  writeFileSync(join(dist, 'index.html'), '<!doctype html><title>app shell</title>');
  writeFileSync(join(dist, 'assets', 'main.js'), 'console.log(1)');
  afterAll(() => rmSync(dist, { recursive: true, force: true }));

  it('serves files with their type and falls back to index.html for client routes', async () => {
    const app = staticRoutes(dist);
    const js = await app.request('/assets/main.js');
    expect(js.status).toBe(200);
    expect(js.headers.get('content-type')).toMatch(/javascript/);
    expect(await js.text()).toBe('console.log(1)');
    const route = await app.request('/studies/123/texts');
    expect(route.status).toBe(200);
    expect(await route.text()).toContain('app shell');
    expect(await (await app.request('/')).text()).toContain('app shell');
  });

  it('does not serve files outside the folder', async () => {
    const res = await staticRoutes(join(dist, 'assets')).request('/%2e%2e/index.html');
    expect(await res.text()).not.toContain('app shell');
  });

  it('explains how to build when the folder is missing', async () => {
    const res = await staticRoutes(join(dist, 'nope')).request('/');
    expect(res.status).toBe(200);
    expect(await res.text()).toContain('pnpm --filter @gloss/web build');
  });
});
