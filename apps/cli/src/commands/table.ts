/** The one list of commands: name, usage line, summary, and a loader for the module that runs it. */
export interface CommandEntry {
  usage: string;
  summary: string;
  run: (argv: string[]) => Promise<number>;
}

const io = { stdin: process.stdin, stdout: process.stdout, stderr: process.stderr };

export const commandTable: Record<string, CommandEntry> = {
  serve: {
    usage: 'gloss serve [--port N] [--no-demo]',
    summary:
      'Start the server (HTTP API, sync endpoint and web app) on PORT (default 8080). On the embedded database, ' +
      'an empty data folder is seeded with the invented demo study unless --no-demo is given.',
    run: async (argv) => (await import('./serve.js')).serveCommand(argv),
  },
  demo: {
    usage: 'gloss demo',
    summary: 'Load the invented demo study (texts, codebook, accounts, cases, memos) into the database, if it is not there yet.',
    run: async (argv) => (await import('./demo.js')).demoCommand(argv),
  },
  migrate: {
    usage: 'gloss migrate',
    summary: 'Run the database migrations (the server also runs them at start).',
    run: async (argv) => (await import('./migrate.js')).migrateCommand(argv),
  },
  user: {
    usage: 'gloss user add --email E --name N [--password P]   (password from GLOSS_PASSWORD or stdin when omitted)',
    summary: 'Manage accounts.',
    run: async (argv) => (await import('./user.js')).userCommand(argv),
  },
  agreement: {
    usage: 'gloss agreement --input FILE|-',
    summary:
      'Compute an intercoder agreement coefficient from a JSON description; prints one JSON object. ' +
      'Bad input exits with status 2 and a JSON error.',
    run: async (argv) => (await import('./agreement.js')).agreementCommand(argv, io),
  },
  export: {
    usage: 'gloss export --study ID --format csv|codebook-md|codebook-csv|memos-md|qdc|qdpx [--layers coders|consensus] [--out FILE]',
    summary:
      'Export a study: segments as CSV, the codebook as Markdown or CSV, memos and jottings as Markdown, or the REFI-QDA ' +
      'codebook (.qdc) or project (.qdpx). --layers consensus: the segments CSV of revealed or closed rounds\' consensus layers. ' +
      'Writes to stdout unless --out is given; progress on stderr. Audited. The file is personal data.',
    run: async (argv) => (await import('./export.js')).exportCommand(argv),
  },
  import: {
    usage: 'gloss import --study ID --format qdc|qdpx FILE [--as EMAIL] | --new-study "Title" --owner EMAIL --format qdc|qdpx FILE',
    summary:
      'Import a REFI-QDA codebook (.qdc) or project (.qdpx) into a study, or into a new study owned by EMAIL. All or nothing; ' +
      'prints a JSON report; what the standard cannot carry and any warnings go to stderr. --end auto|exclusive|inclusive.',
    run: async (argv) => (await import('./import.js')).importCommand(argv),
  },
  retention: {
    usage: 'gloss retention [--delete --yes]',
    summary:
      'List the studies past their retention date (JSON on stdout). --delete removes each with every row of it (asks on a ' +
      'terminal; scripts add --yes). Each deletion leaves one audit entry with ids and counts only.',
    run: async (argv) => (await import('./retention.js')).retentionCommand(argv),
  },
};

export function printHelp(out: NodeJS.WritableStream): void {
  out.write('gloss — real-time collaborative coding of interview transcripts\n\nCommands:\n');
  for (const [name, e] of Object.entries(commandTable)) out.write(`  ${e.usage}\n      ${e.summary}\n`);
  out.write('\nEnvironment: PORT, DATA_DIR, DATABASE_URL, REDIS_URL, PUBLIC_URL (see README.md).\n');
}
