/** Environment parsing: defaults as documented in the brief; bad values stop the start with a clear ConfigError. */
import { describe, expect, it } from 'vitest';
import { loadConfig } from './config.js';
import { ConfigError } from './errors.js';

describe('loadConfig', () => {
  it('has the defaults documented in the root README', () => {
    const c = loadConfig({});
    expect(c.port).toBe(8080);
    expect(c.databaseUrl).toBeUndefined();
    expect(c.dataDir.endsWith('/data')).toBe(true);
    expect(c.host).toBe('127.0.0.1');
    expect(c.maxMessageBytes).toBe(10_485_760);
    expect(c.maxPresenceBytes).toBe(65_536);
    expect(c.sessionMs).toBe(14 * 86_400_000);
    expect(c.logLevel).toBe('info');
    expect(c.webDist.endsWith('/apps/web/dist')).toBe(true);
  });

  it('reads every variable', () => {
    const c = loadConfig({
      PORT: '0',
      HOST: '0.0.0.0',
      DATABASE_URL: 'postgres://u@db:5432/gloss',
      DATA_DIR: '/var/lib/gloss',
      REDIS_URL: 'redis://cache:6379',
      PUBLIC_URL: 'https://gloss.example.org/some/path',
      MAX_MESSAGE_BYTES: '2048',
      MAX_PRESENCE_BYTES: '4096',
      SESSION_DAYS: '0.5',
      WEB_DIST: '/srv/web',
      LOG_LEVEL: 'warn',
    });
    expect(c).toMatchObject({
      port: 0,
      host: '0.0.0.0',
      databaseUrl: 'postgres://u@db:5432/gloss',
      dataDir: '/var/lib/gloss',
      redisUrl: 'redis://cache:6379',
      publicUrl: 'https://gloss.example.org',
      maxMessageBytes: 2048,
      maxPresenceBytes: 4096,
      sessionMs: 43_200_000,
      webDist: '/srv/web',
      logLevel: 'warn',
    });
  });

  it.each([
    ['PORT', '70000'],
    ['PORT', 'eighty'],
    ['DATABASE_URL', 'mysql://x'],
    ['REDIS_URL', 'not a url'],
    ['PUBLIC_URL', 'ftp://x'],
    ['SESSION_DAYS', '-1'],
    ['LOG_LEVEL', 'loud'],
    ['MAX_MESSAGE_BYTES', '10'],
    ['MAX_PRESENCE_BYTES', '12'],
    ['TRUST_PROXY', 'yes'],
    ['TRUST_PROXY', '-1'],
    ['SIGNIN_MAX_FAILURES_PER_ADDRESS', '0'],
  ])('refuses %s=%s with a ConfigError naming the variable', (name, value) => {
    let err: unknown;
    try {
      loadConfig({ [name]: value });
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(ConfigError);
    expect((err as ConfigError).message).toContain(name);
  });

  it('reads TRUST_PROXY as off by default, true as one proxy, or a number of proxies', () => {
    expect(loadConfig({}).trustProxy).toBe(0);
    expect(loadConfig({ TRUST_PROXY: 'false' }).trustProxy).toBe(0);
    expect(loadConfig({ TRUST_PROXY: 'true' }).trustProxy).toBe(1);
    expect(loadConfig({ TRUST_PROXY: '2' }).trustProxy).toBe(2);
  });

  it('reads the sync budgets, with the README defaults, and refuses a burst below the rate', () => {
    expect(loadConfig({}).syncBudgets).toEqual({
      maxBacklogBytes: 16_777_216,
      maxPendingBytesPerConnection: 67_108_864,
      maxCommitQueue: 10_000,
      maxCommitQueueBytes: 67_108_864,
      maxConnectionsPerAddress: 500,
      maxConnectionsPerUser: 100,
      maxMessagesPerSecond: 100,
      messageBurst: 500,
      maxLoadedDocuments: 10_000,
      roomLoadTimeoutMs: 30_000,
      roomUnloadTimeoutMs: 30_000,
      roomIdleMs: 0,
    });
    const c = loadConfig({
      MAX_BACKLOG_BYTES: '2048',
      MAX_PENDING_BYTES_PER_CONNECTION: '100000',
      MAX_COMMIT_QUEUE: '50',
      MAX_COMMIT_QUEUE_BYTES: '70000',
      MAX_CONNECTIONS_PER_ADDRESS: '3',
      MAX_CONNECTIONS_PER_USER: '2',
      MAX_MESSAGES_PER_SECOND: '10',
      MESSAGE_BURST: '20',
      MAX_LOADED_DOCUMENTS: '7',
      ROOM_LOAD_TIMEOUT_SECONDS: '5',
      ROOM_UNLOAD_TIMEOUT_SECONDS: '6',
      ROOM_IDLE_SECONDS: '60',
    });
    expect(c.syncBudgets).toEqual({
      maxBacklogBytes: 2048,
      maxPendingBytesPerConnection: 100_000,
      maxCommitQueue: 50,
      maxCommitQueueBytes: 70_000,
      maxConnectionsPerAddress: 3,
      maxConnectionsPerUser: 2,
      maxMessagesPerSecond: 10,
      messageBurst: 20,
      maxLoadedDocuments: 7,
      roomLoadTimeoutMs: 5_000,
      roomUnloadTimeoutMs: 6_000,
      roomIdleMs: 60_000,
    });
    // A rate above the default burst raises the burst with it; a burst set below the rate is an error.
    expect(loadConfig({ MAX_MESSAGES_PER_SECOND: '1000' }).syncBudgets.messageBurst).toBe(1000);
    expect(() => loadConfig({ MAX_MESSAGES_PER_SECOND: '100', MESSAGE_BURST: '10' })).toThrow(ConfigError);
    expect(() => loadConfig({ MAX_CONNECTIONS_PER_USER: '0' })).toThrow(ConfigError);
  });
});
