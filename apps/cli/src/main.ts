#!/usr/bin/env node
/**
 * `gloss` — the command line. Each command lives in its own module under commands/ and is loaded
 * only when asked for, so `gloss agreement` starts without touching the database or the server.
 */
import { commandTable, printHelp } from './commands/table.js';

const [name, ...rest] = process.argv.slice(2);

async function main(): Promise<number> {
  if (!name || name === '--help' || name === '-h' || name === 'help') {
    printHelp(process.stdout);
    return name ? 0 : 1;
  }
  const entry = commandTable[name];
  if (!entry) {
    process.stderr.write(`gloss: unknown command "${name}". Run "gloss --help" for the list.\n`);
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    process.stdout.write(`${entry.usage}\n\n${entry.summary}\n`);
    return 0;
  }
  return entry.run(rest);
}

main().then(
  (code) => {
    // Long-running commands (serve) never resolve; short ones exit with their status.
    process.exitCode = code;
  },
  (err: unknown) => {
    const e = err as { code?: string; message?: string };
    process.stderr.write(`gloss ${name}: ${e?.message ?? String(err)}\n`);
    process.exitCode = 1;
  },
);
