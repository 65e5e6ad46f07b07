/** `gloss demo`: load the invented demo study into the configured database, unless a study exists. */
import { parseArgs } from 'node:util';
import { openDatabase } from '@gloss/db';
import { loadConfig, seedDemo } from '@gloss/server';
import { printSignIns } from './sign-ins.js';

export async function demoCommand(argv: string[]): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { force: { type: 'boolean', default: false } }, strict: true });
  const config = loadConfig();
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  try {
    const result = await seedDemo(database.db, { force: values.force });
    if (!result.seeded) process.stdout.write('The database already holds a study; nothing loaded (use --force to add the demo anyway).\n');
    printSignIns(result, process.stdout);
    return 0;
  } finally {
    await database.close();
  }
}
