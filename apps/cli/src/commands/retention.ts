/**
 * `gloss retention [--delete --yes]`: lists the studies whose retention date has passed (one JSON
 * object on stdout) and, when asked, deletes them — every row of each, as DELETE /api/studies/:id
 * does. `--delete` alone asks for confirmation on a terminal; scripts pass `--yes`. Open sync
 * connections of a running server notice at their next access re-check (ACCESS_RECHECK_SECONDS).
 */
import { createInterface } from 'node:readline/promises';
import { parseArgs } from 'node:util';
import { openDatabase } from '@gloss/db';
import { admin, loadConfig } from '@gloss/server';

export async function retentionCommand(argv: string[]): Promise<number> {
  let values: { delete?: boolean; yes?: boolean };
  try {
    ({ values } = parseArgs({ args: argv, options: { delete: { type: 'boolean' }, yes: { type: 'boolean' } }, strict: true }));
  } catch (e) {
    process.stderr.write(`gloss retention: ${(e as Error).message}\n`);
    return 2;
  }
  const config = loadConfig();
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  try {
    const due = await admin.studiesPastRetention(database.db);
    for (const s of due) process.stderr.write(`past its retention date (${s.retentionUntil.slice(0, 10)}): ${s.title} — ${s.texts} text(s), id ${s.id}\n`);
    if (due.length === 0) process.stderr.write('No study is past its retention date.\n');
    if (!values.delete || due.length === 0) {
      process.stdout.write(`${JSON.stringify({ past: due, deleted: [] })}\n`);
      return 0;
    }
    if (!values.yes && !(await confirmed(due.length))) {
      process.stderr.write('gloss retention: nothing deleted. Pass --yes to delete without asking (scripts).\n');
      return 2;
    }
    const deleted: string[] = [];
    for (const s of due) {
      await admin.deleteStudy(database.db, s.id, null);
      deleted.push(s.id);
      process.stderr.write(`deleted: ${s.title} (${s.id})\n`);
    }
    process.stdout.write(`${JSON.stringify({ past: due, deleted })}\n`);
    return 0;
  } finally {
    await database.close();
  }
}

/** On a terminal, asks the person to type the number of studies; anywhere else, no. */
async function confirmed(n: number): Promise<boolean> {
  if (!process.stdin.isTTY) return false;
  const rl = createInterface({ input: process.stdin, output: process.stderr });
  try {
    const answer = await rl.question(`Delete ${n} stud${n === 1 ? 'y' : 'ies'} and every row of ${n === 1 ? 'it' : 'them'}? This cannot be undone. Type ${n} to confirm: `);
    return answer.trim() === String(n);
  } finally {
    rl.close();
  }
}
