/**
 * infra/compose.yaml, parsed (the `yaml` package, YAML 1.2 with merge keys as Compose reads them) and
 * checked against what a multi-node Gloss needs: one PostgreSQL, one Redis, two nodes on both, and a
 * proxy in front that passes WebSocket upgrades to both nodes (infra/nginx/gloss.conf, which
 * test/infra/proxy.test.ts runs for real). Keys follow the Compose specification (compose-spec.io).
 */
import { existsSync, readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import { parse } from 'yaml';

const infra = join(dirname(fileURLToPath(import.meta.url)), '..', '..', 'infra');

interface Service {
  image?: string;
  command?: string[];
  environment?: Record<string, string>;
  ports?: string[];
  volumes?: string[];
  depends_on?: Record<string, { condition: string }>;
  healthcheck?: { test: string[] };
}

const compose = parse(readFileSync(join(infra, 'compose.yaml'), 'utf8'), { merge: true }) as { services: Record<string, Service>; volumes?: Record<string, unknown> };
const services = compose.services;
const nodes = ['gloss-1', 'gloss-2'] as const;

describe('infra/compose.yaml', () => {
  it('has PostgreSQL, Redis, two Gloss nodes and a proxy', () => {
    expect(Object.keys(services).sort()).toEqual(['gloss-1', 'gloss-2', 'postgres', 'proxy', 'redis']);
    expect(services.postgres!.image).toMatch(/^postgres:\d+/);
    expect(services.redis!.image).toMatch(/^redis:\d+/);
    expect(services.proxy!.image).toMatch(/^nginx:/);
  });

  it('points both nodes at the one database and the one Redis, behind the proxy', () => {
    const pg = services.postgres!.environment!;
    const dbUrl = new URL(services['gloss-1']!.environment!.DATABASE_URL!);
    expect(dbUrl.hostname).toBe('postgres');
    expect(decodeURIComponent(dbUrl.username)).toBe(pg.POSTGRES_USER);
    expect(decodeURIComponent(dbUrl.password)).toBe(pg.POSTGRES_PASSWORD);
    expect(dbUrl.pathname).toBe(`/${pg.POSTGRES_DB}`);
    for (const name of nodes) {
      const env = services[name]!.environment!;
      expect(env.DATABASE_URL, name).toBe(dbUrl.toString());
      expect(new URL(env.REDIS_URL!).hostname, name).toBe('redis');
      expect(env.HOST, name).toBe('0.0.0.0');
      // One public origin for both (the proxy's), and the client address taken from the proxy's header.
      expect(env.PUBLIC_URL, name).toBe('http://localhost:8080');
      expect(env.TRUST_PROXY, name).toBe('1');
      expect(services[name]!.command!.join(' '), name).toContain('gloss serve');
      // Nodes are reached through the proxy only.
      expect(services[name]!.ports, name).toBeUndefined();
    }
    expect(services['gloss-1']!.depends_on).toMatchObject({ postgres: { condition: 'service_healthy' }, redis: { condition: 'service_healthy' } });
    expect(services.proxy!.depends_on).toMatchObject({ 'gloss-1': {}, 'gloss-2': {} });
    expect(services.proxy!.ports).toEqual(['8080:8080']);
  });

  it('mounts an nginx configuration that sends both nodes WebSocket upgrades', () => {
    const mount = services.proxy!.volumes!.find((v) => v.includes('/etc/nginx/'))!;
    const [source, target] = mount.split(':');
    expect(target).toBe('/etc/nginx/conf.d/default.conf');
    const file = resolve(infra, source!);
    expect(existsSync(file)).toBe(true);
    const conf = readFileSync(file, 'utf8');
    const port = services['gloss-1']!.environment!.PORT;
    for (const name of nodes) expect(conf).toMatch(new RegExp(`server ${name}:${port}\\b`));
    expect(conf).toMatch(/proxy_set_header Upgrade \$http_upgrade;/);
    expect(conf).toMatch(/proxy_set_header Connection \$connection_upgrade;/);
    expect(conf).toMatch(/proxy_http_version 1\.1;/);
    expect(conf).toMatch(/proxy_set_header X-Forwarded-For \$proxy_add_x_forwarded_for;/);
    expect(conf).toMatch(new RegExp(`listen ${services.proxy!.ports![0]!.split(':')[1]};`));
  });
});
