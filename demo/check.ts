// `pnpm tsx demo/check.ts`: checks the demo study's files, prints word counts and problems; exit 1 on any problem.
import { loadDemo } from './load.js';
import { checkDemo, MIN_WORDS } from './verify.js';

const { problems, wordCounts } = checkDemo(loadDemo());
for (const [file, n] of Object.entries(wordCounts)) console.log(`${file}: ${n} words${n < MIN_WORDS ? ' (too short)' : ''}`);
for (const p of problems) console.error(`${p.where}: [${p.code}] ${p.message}`);
console.log(problems.length ? `${problems.length} problem(s)` : 'demo: all checks pass');
process.exitCode = problems.length ? 1 : 0;
