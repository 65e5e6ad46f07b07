/**
 * `gloss export --study ID --format csv|codebook-md|codebook-csv|memos-md|qdc|qdpx [--out FILE]`:
 * the same exports as GET /api/studies/:id/export, straight from the database (DATABASE_URL or
 * DATA_DIR, as `serve`). The file goes to stdout, or to FILE; progress and the data-protection
 * reminder go to stderr. The export is in the study's audit log (as done from the command line).
 */
import { createWriteStream } from 'node:fs';
import { rm } from 'node:fs/promises';
import { once } from 'node:events';
import { parseArgs } from 'node:util';
import { openDatabase } from '@gloss/db';
import { exportLosses } from '@gloss/interchange';
import { createPgUpdateStore, exchange, loadConfig } from '@gloss/server';
import { refusal } from '../refusal.js';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;

export async function exportCommand(argv: string[]): Promise<number> {
  const { values } = parseArgs({ args: argv, options: { study: { type: 'string' }, format: { type: 'string' }, out: { type: 'string' }, layers: { type: 'string' } }, strict: true });
  if (!values.study || !UUID.test(values.study)) return usage('--study needs a study id');
  if (!exchange.isExportFormat(values.format)) return usage(`--format must be one of ${exchange.EXPORT_FORMATS.join(', ')}`);
  const format = values.format;
  const layers = values.layers ?? 'coders';
  if (layers !== 'coders' && layers !== 'consensus') return usage('--layers must be coders or consensus');
  const config = loadConfig();
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  const store = createPgUpdateStore(database);
  const err = process.stderr;
  let last = -1;
  const onProgress = (f: number) => {
    const pct = Math.floor(f * 100);
    if (pct > last) {
      last = pct;
      err.write(`gloss export: ${pct}%\n`);
    }
  };
  try {
    if (format === 'qdc' || format === 'qdpx') for (const l of exportLosses(format)) err.write(`note: ${l}\n`);
    const result = await exchange.runExport(database.db, store, values.study.toLowerCase(), format, { actorId: null, via: 'cli', onProgress, layers }).catch((e: unknown) => {
      const refused = refusal(e);
      if (refused !== null) throw Object.assign(new Error(refused), { exitCode: 2 });
      throw e;
    });
    const out = values.out ? createWriteStream(values.out) : process.stdout;
    try {
      for await (const chunk of result.body) if (!out.write(chunk)) await once(out, 'drain');
      if (values.out) {
        out.end();
        await once(out, 'finish');
      }
    } catch (e) {
      if (values.out) await rm(values.out, { force: true }); // no half-written file left behind
      throw e;
    }
    err.write(`gloss export: ${format} written${values.out ? ` to ${values.out}` : ''}. It holds personal data: store and share it as your ethics approval allows.\n`);
    return 0;
  } catch (e) {
    const x = e as { exitCode?: number; message?: string };
    if (x.exitCode) {
      err.write(`gloss export: ${x.message}\n`);
      return x.exitCode;
    }
    throw e;
  } finally {
    await store.close();
    await database.close();
  }
}

function usage(message: string): number {
  process.stderr.write(`gloss export: ${message}\nusage: gloss export --study ID --format csv|codebook-md|codebook-csv|memos-md|qdc|qdpx [--layers coders|consensus] [--out FILE]\n`);
  return 2;
}
