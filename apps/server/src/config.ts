/** Server configuration from the environment, checked once at start. */
import { availableParallelism } from 'node:os';
import { resolve } from 'node:path';
import { ConfigError } from './errors.js';
import { DEFAULT_BUDGETS, type SyncBudgets } from './sync/budgets.js';

export type LogLevel = 'debug' | 'info' | 'warn' | 'error' | 'silent';

export interface ServerConfig {
  port: number;
  host: string;
  /** PostgreSQL when set; otherwise embedded PGlite in dataDir. */
  databaseUrl: string | undefined;
  dataDir: string;
  redisUrl: string | undefined;
  /** Public origin (https://gloss.example.org), allowed for Origin checks and used for Secure cookies. */
  publicUrl: string | undefined;
  maxMessageBytes: number;
  /** Largest presence (awareness) state one client may hold in a room; larger closes that connection. */
  maxPresenceBytes: number;
  /** Session lifetime; sessions slide forward when used past half of it. */
  sessionMs: number;
  webDist: string;
  logLevel: LogLevel;
  /** Largest accepted HTTP request body. */
  maxBodyBytes: number;
  /** Sign-in failures per email+address within the window before 429. */
  signInMaxFailures: number;
  /** Failures per email from all addresses, and per address for all emails, within the window. */
  signInMaxFailuresPerEmail: number;
  signInMaxFailuresPerAddress: number;
  signInWindowMs: number;
  /** Most keys the sign-in limiter tracks; when full, new keys are refused rather than old ones forgotten. */
  signInTrackedKeys: number;
  /** Proxies in front that append to X-Forwarded-For (0: the header is ignored; the socket's address counts). */
  trustProxy: number;
  pingIntervalMs: number;
  /** Open sync connections are all re-checked this often (0: only on changes and session expiry). */
  accessRecheckMs: number;
  /** Worker threads for heavy work (agreement with bootstrap, file reading, project exports). */
  heavyThreads: number;
  /** A heavy job running longer is stopped. */
  heavyTimeoutMs: number;
  /** Heap ceiling of each heavy-work thread, MiB. */
  heavyMemoryMb: number;
  /** Heavy jobs waiting for a thread before new ones are refused (503). */
  heavyQueue: number;
  /** Heavy requests one person may start per minute (sliding), and run at once; more get a 429. */
  heavyPerMinute: number;
  heavyAtOnce: number;
  /** Sync resource budgets (sync/budgets.ts): per connection, person, address and node. */
  syncBudgets: SyncBudgets;
}

const LOG_LEVELS: LogLevel[] = ['debug', 'info', 'warn', 'error', 'silent'];

function int(env: NodeJS.ProcessEnv, name: string, fallback: number, min: number, max = Number.MAX_SAFE_INTEGER): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < min || n > max) throw new ConfigError(`${name} must be an integer from ${min} to ${max}, got "${raw}"`);
  return n;
}

function positive(env: NodeJS.ProcessEnv, name: string, fallback: number): number {
  const raw = env[name];
  if (raw === undefined || raw === '') return fallback;
  const n = Number(raw);
  if (!Number.isFinite(n) || n <= 0) throw new ConfigError(`${name} must be a positive number, got "${raw}"`);
  return n;
}

function url(env: NodeJS.ProcessEnv, name: string, protocols: string[]): string | undefined {
  const raw = env[name];
  if (!raw) return undefined;
  let parsed: URL;
  try {
    parsed = new URL(raw);
  } catch {
    throw new ConfigError(`${name} is not a URL: "${raw}"`);
  }
  if (!protocols.includes(parsed.protocol)) throw new ConfigError(`${name} must start with ${protocols.join(' or ')}`);
  return raw;
}

/** TRUST_PROXY: a number of proxy hops, or true/false (1/0). */
function trustProxy(raw: string | undefined): number {
  if (raw === undefined || raw === '' || raw === 'false') return 0;
  if (raw === 'true') return 1;
  const n = Number(raw);
  if (!Number.isInteger(n) || n < 0 || n > 10) throw new ConfigError(`TRUST_PROXY must be false, true or a number of proxies from 0 to 10, got "${raw}"`);
  return n;
}

export function loadConfig(env: NodeJS.ProcessEnv = process.env): ServerConfig {
  const logLevel = (env.LOG_LEVEL || 'info') as LogLevel;
  if (!LOG_LEVELS.includes(logLevel)) throw new ConfigError(`LOG_LEVEL must be one of ${LOG_LEVELS.join(', ')}`);
  const publicUrl = url(env, 'PUBLIC_URL', ['http:', 'https:']);
  return {
    port: int(env, 'PORT', 8080, 0, 65535),
    // Loopback by default: a laptop running a study should not offer interview data to its network.
    host: env.HOST || '127.0.0.1',
    databaseUrl: url(env, 'DATABASE_URL', ['postgres:', 'postgresql:']),
    dataDir: resolve(env.DATA_DIR || './data'),
    redisUrl: url(env, 'REDIS_URL', ['redis:', 'rediss:']),
    publicUrl: publicUrl ? new URL(publicUrl).origin : undefined,
    maxMessageBytes: int(env, 'MAX_MESSAGE_BYTES', 10 * 1024 * 1024, 1024),
    // A caret, a selection, a name and a colour take well under 1 KiB; every joiner is sent every state.
    maxPresenceBytes: int(env, 'MAX_PRESENCE_BYTES', 64 * 1024, 256),
    // SESSION_DAYS may be fractional so tests can use seconds-long sessions.
    sessionMs: Math.round(positive(env, 'SESSION_DAYS', 14) * 86_400_000),
    webDist: resolve(env.WEB_DIST || new URL('../../web/dist', import.meta.url).pathname),
    logLevel,
    maxBodyBytes: int(env, 'MAX_BODY_BYTES', 5 * 1024 * 1024, 1024),
    signInMaxFailures: int(env, 'SIGNIN_MAX_FAILURES', 5, 1),
    signInMaxFailuresPerEmail: int(env, 'SIGNIN_MAX_FAILURES_PER_EMAIL', 20, 1),
    signInMaxFailuresPerAddress: int(env, 'SIGNIN_MAX_FAILURES_PER_ADDRESS', 100, 1),
    signInWindowMs: int(env, 'SIGNIN_WINDOW_SECONDS', 15 * 60, 1) * 1000,
    signInTrackedKeys: int(env, 'SIGNIN_TRACKED_KEYS', 100_000, 100),
    trustProxy: trustProxy(env.TRUST_PROXY),
    pingIntervalMs: int(env, 'PING_INTERVAL_MS', 30_000, 100),
    accessRecheckMs: int(env, 'ACCESS_RECHECK_SECONDS', 60, 0) * 1000,
    // One core stays with the event loop (sync, requests); at most four threads, whatever the machine.
    heavyThreads: int(env, 'HEAVY_THREADS', Math.max(1, Math.min(4, availableParallelism() - 1)), 1, 64),
    heavyTimeoutMs: int(env, 'HEAVY_TIMEOUT_SECONDS', 120, 1) * 1000,
    heavyMemoryMb: int(env, 'HEAVY_MEMORY_MB', 512, 64),
    heavyQueue: int(env, 'HEAVY_QUEUE', 64, 1),
    heavyPerMinute: int(env, 'HEAVY_PER_MINUTE', 120, 1),
    heavyAtOnce: int(env, 'HEAVY_AT_ONCE', 2, 1),
    syncBudgets: syncBudgets(env),
  };
}

function syncBudgets(env: NodeJS.ProcessEnv): SyncBudgets {
  const d = DEFAULT_BUDGETS;
  const maxMessagesPerSecond = int(env, 'MAX_MESSAGES_PER_SECOND', d.maxMessagesPerSecond, 1);
  const budgets: SyncBudgets = {
    maxBacklogBytes: int(env, 'MAX_BACKLOG_BYTES', d.maxBacklogBytes, 1024),
    maxPendingBytesPerConnection: int(env, 'MAX_PENDING_BYTES_PER_CONNECTION', d.maxPendingBytesPerConnection, 64 * 1024),
    maxCommitQueue: int(env, 'MAX_COMMIT_QUEUE', d.maxCommitQueue, 1),
    maxCommitQueueBytes: int(env, 'MAX_COMMIT_QUEUE_BYTES', d.maxCommitQueueBytes, 64 * 1024),
    maxConnectionsPerAddress: int(env, 'MAX_CONNECTIONS_PER_ADDRESS', d.maxConnectionsPerAddress, 1),
    maxConnectionsPerUser: int(env, 'MAX_CONNECTIONS_PER_USER', d.maxConnectionsPerUser, 1),
    maxMessagesPerSecond,
    messageBurst: int(env, 'MESSAGE_BURST', Math.max(d.messageBurst, maxMessagesPerSecond), 1),
    maxLoadedDocuments: int(env, 'MAX_LOADED_DOCUMENTS', d.maxLoadedDocuments, 1),
    roomLoadTimeoutMs: int(env, 'ROOM_LOAD_TIMEOUT_SECONDS', d.roomLoadTimeoutMs / 1000, 1) * 1000,
    roomUnloadTimeoutMs: int(env, 'ROOM_UNLOAD_TIMEOUT_SECONDS', d.roomUnloadTimeoutMs / 1000, 1) * 1000,
    roomIdleMs: int(env, 'ROOM_IDLE_SECONDS', d.roomIdleMs / 1000, 0) * 1000,
  };
  if (budgets.messageBurst < budgets.maxMessagesPerSecond) throw new ConfigError('MESSAGE_BURST must be at least MAX_MESSAGES_PER_SECOND');
  return budgets;
}
