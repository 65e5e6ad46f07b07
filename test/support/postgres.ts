/**
 * A fresh PostgreSQL database per test suite or server spawn, created from DATABASE_URL and dropped
 * afterwards. In CI DATABASE_URL is set and suites needing PostgreSQL must run; on a laptop without
 * it they skip (see dbKinds()).
 */
import { randomBytes } from 'node:crypto';
import postgres from 'postgres';

export type DbKindUnderTest = 'pglite' | 'postgres';

/** The database kinds to test against here: PGlite always, PostgreSQL when DATABASE_URL is set. */
export function dbKinds(): DbKindUnderTest[] {
  return process.env.DATABASE_URL ? ['pglite', 'postgres'] : ['pglite'];
}

export interface FreshPostgres {
  url: string;
  name: string;
  drop(): Promise<void>;
}

export async function freshPostgresDatabase(baseUrl = process.env.DATABASE_URL): Promise<FreshPostgres> {
  if (!baseUrl) throw new Error('freshPostgresDatabase: DATABASE_URL is not set');
  const name = `gloss_t_${randomBytes(6).toString('hex')}`;
  const admin = postgres(baseUrl, { max: 1, onnotice: () => undefined });
  try {
    await admin.unsafe(`create database "${name}"`);
  } finally {
    await admin.end({ timeout: 5 });
  }
  const url = new URL(baseUrl);
  url.pathname = `/${name}`;
  return {
    url: url.toString(),
    name,
    async drop() {
      const admin2 = postgres(baseUrl, { max: 1, onnotice: () => undefined });
      try {
        // WITH (FORCE) ends leftover connections of a killed server (PostgreSQL >= 13).
        await admin2.unsafe(`drop database if exists "${name}" with (force)`);
      } finally {
        await admin2.end({ timeout: 5 });
      }
    },
  };
}
