/**
 * `gloss import --study ID --format qdc|qdpx FILE [--as EMAIL]` adds a REFI-QDA codebook or project
 * to a study (acting as EMAIL, by default the study's first owner);
 * `gloss import --new-study "Title" --owner EMAIL --format qdc|qdpx FILE` makes a new study owned by
 * that account. `--end auto|exclusive|inclusive` says how to read selection ends (default auto).
 * The report (JSON) goes to stdout; what the standard cannot carry, progress and warnings to stderr.
 * A refused file exits 2 with `{"error":{code,message}}` on stdout and writes nothing.
 */
import { readFile } from 'node:fs/promises';
import { parseArgs } from 'node:util';
import { and, asc, eq, memberships, openDatabase, users } from '@gloss/db';
import { ExchangeError, importLosses } from '@gloss/interchange';
import { createPgUpdateStore, exchange, loadConfig } from '@gloss/server';
import { refusal } from '../refusal.js';

const UUID = /^[0-9a-f]{8}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{4}-[0-9a-f]{12}$/i;
const USAGE = 'usage: gloss import --study ID --format qdc|qdpx FILE [--as EMAIL]\n       gloss import --new-study "Title" --owner EMAIL --format qdc|qdpx FILE';

export async function importCommand(argv: string[]): Promise<number> {
  const { values, positionals } = parseArgs({
    args: argv,
    options: { study: { type: 'string' }, 'new-study': { type: 'string' }, owner: { type: 'string' }, as: { type: 'string' }, format: { type: 'string' }, end: { type: 'string' } },
    allowPositionals: true,
    strict: true,
  });
  const err = process.stderr;
  const fail = (message: string, code = 2) => {
    err.write(`gloss import: ${message}\n${code === 2 && /usage|needs|must/.test(message) ? USAGE + '\n' : ''}`);
    return code;
  };
  const file = positionals[0];
  if (!file || positionals.length > 1) return fail('needs exactly one FILE');
  if (values.format !== 'qdc' && values.format !== 'qdpx') return fail('--format must be qdc or qdpx');
  if (Boolean(values.study) === Boolean(values['new-study'])) return fail('needs either --study ID or --new-study "Title"');
  if (values.study && !UUID.test(values.study)) return fail('--study needs a study id');
  if (values['new-study'] !== undefined && !values.owner) return fail('--new-study needs --owner EMAIL');
  const end = values.end ?? 'auto';
  if (end !== 'auto' && end !== 'exclusive' && end !== 'inclusive') return fail('--end must be auto, exclusive or inclusive');
  let bytes: Uint8Array;
  try {
    bytes = await readFile(file);
  } catch (e) {
    return fail(`cannot read ${file}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`);
  }
  const config = loadConfig();
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  const store = createPgUpdateStore(database);
  try {
    const email = (values.owner ?? values.as)?.trim().toLowerCase();
    let actorId: string | undefined;
    if (email) {
      const [u] = await database.db.select({ id: users.id }).from(users).where(eq(users.email, email));
      if (!u) return fail(`no account with the email ${email} (create one with "gloss user add")`);
      actorId = u.id;
    } else {
      const [o] = await database.db
        .select({ id: memberships.userId })
        .from(memberships)
        .where(and(eq(memberships.studyId, values.study!.toLowerCase()), eq(memberships.role, 'owner')))
        .orderBy(asc(memberships.createdAt));
      if (!o) return fail(`no study ${values.study} (or it has no owner)`);
      actorId = o.id;
    }
    for (const l of importLosses(values.format)) err.write(`note: ${l}\n`);
    let last = -1;
    const report = await exchange.runImport(
      database.db,
      store,
      values.study ? { studyId: values.study.toLowerCase() } : { newStudy: { title: values['new-study']! } },
      values.format,
      bytes,
      actorId,
      {
        endPosition: end,
        onProgress: (f) => {
          const pct = Math.floor(f * 100);
          if (pct > last) err.write(`gloss import: ${(last = pct)}%\n`);
        },
      },
    );
    for (const w of report.warnings) err.write(`warning: ${w}\n`);
    err.write(`gloss import: end positions read ${report.endReading}. Start (or restart) the server to see the import in open screens.\n`);
    const { documentIds: _d, ...out } = report;
    process.stdout.write(JSON.stringify(out) + '\n');
    return 0;
  } catch (e) {
    if (e instanceof ExchangeError) {
      process.stdout.write(JSON.stringify({ error: e.toJSON() }) + '\n');
      return fail(`${e.message} (nothing was imported)`);
    }
    const refused = refusal(e);
    if (refused !== null) return fail(refused);
    throw e;
  } finally {
    await store.close();
    await database.close();
  }
}
