/**
 * On a database without any account, prints the one-time set-up code: a JSON line
 * `{"event":"setup","code":…}` for scripts and tests, then words for people.
 */
import type { RunningServer } from './server.js';

export async function printSetupCode(server: Pick<RunningServer, 'firstRun' | 'url'>, out: NodeJS.WritableStream): Promise<boolean> {
  if (!(await server.firstRun.open())) return false;
  out.write(JSON.stringify({ event: 'setup', code: server.firstRun.code }) + '\n');
  out.write(
    `\nNo account exists yet. Open ${server.url} and create the owner account with this one-time set-up code:\n\n    ${server.firstRun.code}\n\n` +
      'It works once, only from this terminal’s server, and only until the first account exists.\n',
  );
  return true;
}
