// Reads the demo study's files from disk into one bundle; checking is done separately by verify.ts.
import { readFileSync, readdirSync } from 'node:fs';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { DemoBundle } from './verify.js';

export const demoDir = dirname(fileURLToPath(import.meta.url));

export class DemoLoadError extends Error {
  readonly code = 'demo-load';
  constructor(readonly file: string, cause: unknown) {
    super(`cannot read demo file ${file}: ${cause instanceof Error ? cause.message : String(cause)}`, { cause });
  }
}

function readJson(dir: string, file: string): unknown {
  try {
    return JSON.parse(readFileSync(join(dir, file), 'utf8'));
  } catch (err) {
    throw new DemoLoadError(file, err);
  }
}

/** Loads every demo file. Texts are every `texts/*.txt`, whether or not the index lists them. */
export function loadDemo(dir: string = demoDir): DemoBundle {
  const texts: Record<string, string> = {};
  for (const f of readdirSync(join(dir, 'texts')).filter((n) => n.endsWith('.txt')).sort()) {
    const bytes = readFileSync(join(dir, 'texts', f));
    // fatal: true makes invalid UTF-8 an error instead of silently becoming U+FFFD
    try {
      texts[f] = new TextDecoder('utf-8', { fatal: true }).decode(bytes);
    } catch (err) {
      throw new DemoLoadError(`texts/${f}`, err);
    }
  }
  return {
    study: readJson(dir, 'study.json'),
    index: readJson(dir, 'texts/index.json'),
    codebook: readJson(dir, 'codebook.json'),
    groups: readJson(dir, 'codebook-groups.json'),
    accounts: readJson(dir, 'accounts.json'),
    cases: readJson(dir, 'cases.json'),
    memos: readJson(dir, 'memos.json'),
    texts,
  };
}
