/**
 * A Gloss server of its own for a browser test that starts from nothing: `node --import tsx
 * apps/server/src/main.ts` on a fresh temporary PGlite folder, no demo, the built web app. Resolves
 * once it printed its listening line, with the one-time set-up code it printed before.
 */
import { spawn } from 'node:child_process';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { createInterface } from 'node:readline';
import { fileURLToPath } from 'node:url';

export interface FreshServer {
  url: string;
  setupCode: string;
  stop(): Promise<void>;
}

const repoRoot = fileURLToPath(new URL('../../', import.meta.url));

export async function startFreshServer(): Promise<FreshServer> {
  const dataDir = mkdtempSync(join(tmpdir(), 'gloss-e2e-fresh-'));
  const env: NodeJS.ProcessEnv = { ...process.env, PORT: '0', HOST: '127.0.0.1', DATA_DIR: dataDir, LOG_LEVEL: 'warn', WEB_DIST: join(repoRoot, 'apps/web/dist') };
  delete env.DATABASE_URL;
  delete env.REDIS_URL;
  delete env.PUBLIC_URL;
  const proc = spawn(process.execPath, ['--import', 'tsx', join(repoRoot, 'apps/server/src/main.ts')], { cwd: repoRoot, env, stdio: ['ignore', 'pipe', 'pipe'] });
  let stderr = '';
  proc.stderr!.setEncoding('utf8').on('data', (c: string) => (stderr += c));
  const lines = createInterface({ input: proc.stdout! });
  let setupCode = '';
  const url = await new Promise<string>((resolve, reject) => {
    // A cold tsx start plus PGlite's first migration took minutes on the loaded 2-core machine.
    const timer = setTimeout(() => {
      proc.kill('SIGKILL');
      rmSync(dataDir, { recursive: true, force: true });
      reject(new Error(`fresh server did not start within 240 s\n${stderr}`));
    }, 240_000);
    proc.once('exit', (code) => reject(new Error(`fresh server exited (${code})\n${stderr}`)));
    lines.on('line', (line) => {
      if (!line.startsWith('{')) return;
      const event = JSON.parse(line) as { event?: string; code?: string; url?: string };
      if (event.event === 'setup') setupCode = event.code!;
      if (event.event === 'listening') {
        clearTimeout(timer);
        resolve(event.url!);
      }
    });
  });
  return {
    url,
    setupCode,
    async stop() {
      if (proc.exitCode === null && proc.signalCode === null) {
        const exited = new Promise((r) => proc.once('exit', r));
        proc.kill('SIGTERM');
        await exited;
      }
      rmSync(dataDir, { recursive: true, force: true });
    },
  };
}
