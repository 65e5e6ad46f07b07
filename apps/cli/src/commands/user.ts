/** `gloss user add`: create an account. The password comes from --password, GLOSS_PASSWORD or stdin. */
import { parseArgs } from 'node:util';
import { openDatabase } from '@gloss/db';
import { admin, loadConfig } from '@gloss/server';
import { refusal } from '../refusal.js';

async function readStdin(): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const c of process.stdin) chunks.push(c as Buffer);
  return Buffer.concat(chunks).toString('utf8').split(/\r?\n/)[0] ?? '';
}

export async function userCommand(argv: string[]): Promise<number> {
  const [sub, ...rest] = argv;
  if (sub !== 'add') {
    process.stderr.write('usage: gloss user add --email E --name N [--password P]\n');
    return 2;
  }
  const { values } = parseArgs({
    args: rest,
    options: { email: { type: 'string' }, name: { type: 'string' }, password: { type: 'string' } },
    strict: true,
  });
  if (!values.email || !values.name) {
    process.stderr.write('gloss user add: --email and --name are required\n');
    return 2;
  }
  const password = values.password ?? process.env.GLOSS_PASSWORD ?? (await readStdin());
  const config = loadConfig();
  const database = await openDatabase({ databaseUrl: config.databaseUrl, dataDir: config.dataDir });
  try {
    const user = await admin.createUser(database.db, { email: values.email, name: values.name, password });
    process.stdout.write(JSON.stringify({ id: user.id, email: user.email, name: user.name }) + '\n');
    return 0;
  } catch (err) {
    const refused = refusal(err);
    if (refused !== null) {
      process.stderr.write(`gloss user add: ${refused}\n`);
      return 2;
    }
    throw err;
  } finally {
    await database.close();
  }
}
