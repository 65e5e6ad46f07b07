/**
 * `pnpm bench`: runs every `bench/*.bench.ts` (or those named on the command line) one after another
 * and prints one JSON line per record. Each bench module exports `run(): Promise<BenchRecord[]>`.
 * Benchmarks run in series on purpose: two at once would share the 2 cores and spoil each other's figures.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export interface BenchRecord { name: string; [key: string]: unknown }

// Servers that benchmarks start (in process or as children) log to stdout; keep their warnings
// (expected ones, such as clients hanging up mid-upgrade) out of the JSON lines.
process.env.LOG_LEVEL ??= 'error';

const here = dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => wanted.length === 0 || wanted.some((w) => f.includes(w)))
  .sort();

let failed = 0;
for (const file of files) {
  const started = performance.now();
  try {
    const mod = (await import(pathToFileURL(join(here, file)).href)) as { run: () => Promise<BenchRecord[]> };
    for (const record of await mod.run()) process.stdout.write(JSON.stringify({ file, ...record }) + '\n');
  } catch (err) {
    failed++;
    process.stdout.write(JSON.stringify({ file, name: file.replace('.bench.ts', ''), error: String((err as Error)?.stack ?? err) }) + '\n');
  }
  process.stderr.write(`bench ${file}: ${((performance.now() - started) / 1000).toFixed(1)} s\n`);
}
process.exit(failed ? 1 : 0);
