import type { SeedResult } from '@gloss/server';

export function printSignIns(result: SeedResult, out: NodeJS.WritableStream): void {
  out.write(result.seeded ? '\nLoaded the invented demo study. Sign in as:\n' : '\nDemo sign-ins (the demo study is already loaded):\n');
  for (const a of result.accounts) out.write(`  ${a.role.padEnd(9)} ${a.email.padEnd(24)} ${a.password}\n`);
}
