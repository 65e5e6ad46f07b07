/**
 * `gloss serve`: start the server; on an empty embedded database, seed the invented demo study first.
 * With --no-demo (and always on PostgreSQL) an empty database gets a one-time set-up code instead.
 */
import { parseArgs } from 'node:util';
import { createLogger, loadConfig, printSetupCode, seedDemo, startServer } from '@gloss/server';
import { printSignIns } from './sign-ins.js';

export async function serveCommand(argv: string[]): Promise<number> {
  const { values } = parseArgs({
    args: argv,
    options: { port: { type: 'string' }, 'no-demo': { type: 'boolean', default: false } },
    strict: true,
  });
  const config = loadConfig({ ...process.env, ...(values.port ? { PORT: values.port } : {}) });
  const logger = createLogger(config.logLevel);
  // The demo goes only into the embedded database, and only when it holds no study yet:
  // a PostgreSQL deployment is seeded on purpose with `gloss demo`, never by accident.
  // It runs as the server's start-up step: health says "not ready" and sign-in waits until it is done.
  let seeded: Awaited<ReturnType<typeof seedDemo>> | null = null;
  const withDemo = !config.databaseUrl && !values['no-demo'];
  const server = await startServer(config, logger, {
    prepare: withDemo ? { what: 'demo study seeding', run: async (db) => void (seeded = await seedDemo(db)) } : undefined,
  });

  // Without the demo (PostgreSQL, or --no-demo) a fresh database waits for its owner: print the code.
  await printSetupCode(server, process.stdout);
  process.stdout.write(JSON.stringify({ event: 'listening', url: server.url, port: server.port, db: server.database.kind }) + '\n');
  process.stdout.write(`\nGloss is running at ${server.url}  (database: ${server.database.kind === 'pglite' ? `embedded, ${config.dataDir}` : 'PostgreSQL'})\n`);
  if (seeded) printSignIns(seeded, process.stdout);
  process.stdout.write(
    '\nInterview transcripts are personal data: follow your ethics approval, consent terms and data-protection law (see README).\n',
  );

  await new Promise<void>((resolve) => {
    let stopping = false;
    const stop = () => {
      if (stopping) process.exit(1);
      stopping = true;
      server.close().then(resolve, (err: unknown) => {
        logger.error({ err }, 'close failed');
        process.exit(1);
      });
    };
    process.on('SIGINT', stop);
    process.on('SIGTERM', stop);
  });
  return 0;
}
