/**
 * `node --import tsx apps/server/src/main.ts` (or `pnpm gloss serve`): start from the environment. Not the
 * `tsx` command: it re-sends a signal after 30 ms and then kills, cutting a graceful shutdown short. Prints one JSON line
 * `{"event":"listening","url":…,"port":…,"db":…}` on stdout (scripts and tests parse it), then the
 * URL for people. SIGINT/SIGTERM close gracefully; a second signal exits at once.
 */
import { ConfigError } from './errors.js';
import { loadConfig } from './config.js';
import { createLogger } from './logger.js';
import { printSetupCode } from './print-setup-code.js';
import { startServer } from './server.js';

async function main(): Promise<void> {
  let config;
  try {
    config = loadConfig();
  } catch (err) {
    if (err instanceof ConfigError) {
      process.stderr.write(`gloss: ${err.message}\n`);
      process.exit(2);
    }
    throw err;
  }
  const logger = createLogger(config.logLevel);
  const server = await startServer(config, logger);
  await printSetupCode(server, process.stdout);
  process.stdout.write(JSON.stringify({ event: 'listening', url: server.url, port: server.port, db: server.database.kind }) + '\n');
  process.stdout.write(`Gloss is running at ${server.url}\n`);

  let stopping = false;
  const stop = (signal: string) => {
    if (stopping) process.exit(1);
    stopping = true;
    logger.info({ signal }, 'closing');
    server.close().then(
      () => process.exit(0),
      (err: unknown) => {
        logger.error({ err }, 'close failed');
        process.exit(1);
      },
    );
  };
  process.on('SIGINT', () => stop('SIGINT'));
  process.on('SIGTERM', () => stop('SIGTERM'));
}

main().catch((err: unknown) => {
  process.stderr.write(`gloss: could not start: ${err instanceof Error ? err.message : String(err)}\n`);
  process.exit(1);
});
