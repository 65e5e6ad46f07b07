/**
 * `gloss agreement --input FILE|-`: one agreement coefficient from a JSON description, printed as one
 * JSON object `{statistic, value, ...details}`. Outside scripts rely on this shape. Bad input: exit 2
 * and `{"error":{"code","message"}}` on stdout (and a line on stderr).
 */
import { readFile } from 'node:fs/promises';
import {
  AgreementError,
  bennettS,
  bootstrapAlpha,
  cohenKappa,
  countsFromData,
  fleissKappa,
  krippendorffAlpha,
  percentAgreement,
  percentAgreementFromTable,
  scottPi,
  tableFromData,
  unitizingAlpha1995,
  unitizingAlpha2016,
} from '@gloss/agreement';
import { z } from 'zod';

export interface CommandIo {
  stdin: NodeJS.ReadableStream;
  stdout: NodeJS.WritableStream;
  stderr: NodeJS.WritableStream;
}

const value = z.union([z.number().finite(), z.string()]);
const cell = value.nullable();
const data = z.array(z.array(cell)).min(1);
const table = z.array(z.array(z.number().finite().nonnegative())).min(1);
const dataOrTable = { table: table.optional(), data: data.optional() };

const request = z.discriminatedUnion('statistic', [
  z.object({
    statistic: z.literal('krippendorff-alpha'),
    level: z.enum(['nominal', 'ordinal', 'interval', 'ratio']).default('nominal'),
    data,
    order: z.array(value).optional(),
    bootstrap: z
      .object({
        replicates: z.number().int().min(1).max(100_000).default(1000),
        seed: z.number().int().nonnegative().default(1),
        confidence: z.number().gt(0).lt(1).default(0.95),
      })
      .optional(),
  }),
  z.object({ statistic: z.literal('cohen-kappa'), ...dataOrTable }),
  z.object({ statistic: z.literal('scott-pi'), ...dataOrTable }),
  z.object({ statistic: z.literal('bennett-s'), ...dataOrTable, categories: z.number().int().min(1).optional() }),
  z.object({ statistic: z.literal('percent-agreement'), ...dataOrTable, convention: z.enum(['pairable-values', 'unit-mean']).optional() }),
  z.object({ statistic: z.literal('fleiss-kappa'), counts: z.array(z.array(z.number().int().nonnegative())).min(1).optional(), data: data.optional() }),
  z.object({
    statistic: z.literal('unitizing-alpha'),
    variant: z.enum(['u1995', 'u', 'binary-u', 'cu', 'k-u']),
    continuum: z.object({ start: z.number().int(), end: z.number().int() }),
    units: z.array(z.object({ coder: z.string(), value, start: z.number().int(), end: z.number().int() })),
    coders: z.array(z.string()).optional(),
    category: value.optional(),
  }),
]);
type Request = z.infer<typeof request>;

class UsageError extends Error {
  readonly code: string;
  constructor(code: string, message: string) {
    super(message);
    this.code = code;
  }
}

export async function agreementCommand(argv: string[], io: CommandIo): Promise<number> {
  try {
    const input = inputPath(argv);
    const text = input === '-' ? await readAll(io.stdin) : await readFile(input, 'utf8').catch((e: NodeJS.ErrnoException) => {
      throw new UsageError('input-unreadable', `cannot read ${input}: ${e.code ?? e.message}`);
    });
    let json: unknown;
    try {
      json = JSON.parse(text);
    } catch (e) {
      throw new UsageError('invalid-json', `input is not JSON: ${(e as Error).message}`);
    }
    const parsed = request.safeParse(json);
    if (!parsed.success) throw new UsageError('invalid-input', z.prettifyError(parsed.error).replace(/\s*\n\s*/g, '; '));
    const { statistic, value, ...details } = compute(parsed.data);
    io.stdout.write(JSON.stringify({ statistic, value, ...details }) + '\n');
    return 0;
  } catch (err) {
    if (err instanceof UsageError || err instanceof AgreementError) {
      io.stdout.write(JSON.stringify({ error: { code: err.code, message: err.message } }) + '\n');
      io.stderr.write(`gloss agreement: ${err.message}\n`);
      return 2;
    }
    throw err;
  }
}

function inputPath(argv: string[]): string {
  const at = argv.indexOf('--input');
  const path = at >= 0 ? argv[at + 1] : argv.find((a) => a.startsWith('--input='))?.slice('--input='.length);
  if (!path) throw new UsageError('usage', 'usage: gloss agreement --input FILE|-');
  return path;
}

async function readAll(stream: NodeJS.ReadableStream): Promise<string> {
  const chunks: Buffer[] = [];
  for await (const chunk of stream) chunks.push(typeof chunk === 'string' ? Buffer.from(chunk) : (chunk as Buffer));
  return Buffer.concat(chunks).toString('utf8');
}

function twoCoderTable(req: { table?: number[][] | undefined; data?: Array<Array<string | number | null>> | undefined }): number[][] {
  if (req.table && req.data) throw new UsageError('invalid-input', 'give either "table" or "data", not both');
  if (req.table) return req.table;
  if (req.data) return tableFromData(req.data).table;
  throw new UsageError('invalid-input', 'give "table" (square contingency table) or "data" (two coder rows)');
}

function compute(req: Request): Record<string, unknown> {
  switch (req.statistic) {
    case 'krippendorff-alpha': {
      const r = krippendorffAlpha(req.data, { level: req.level, order: req.order });
      if (!req.bootstrap) return { ...r };
      const b = bootstrapAlpha(req.data, { level: req.level, order: req.order, ...req.bootstrap });
      return { ...r, ci: b.ci, bootstrap: { ...b, value: undefined } };
    }
    case 'cohen-kappa':
      return { ...cohenKappa(twoCoderTable(req)) };
    case 'scott-pi':
      return { ...scottPi(twoCoderTable(req)) };
    case 'bennett-s':
      return { ...bennettS(twoCoderTable(req), req.categories) };
    case 'percent-agreement':
      if (req.data && !req.table) return { ...percentAgreement(req.data, req.convention) };
      return { ...percentAgreementFromTable(twoCoderTable(req)) };
    case 'fleiss-kappa': {
      if (req.counts && req.data) throw new UsageError('invalid-input', 'give either "counts" or "data", not both');
      if (req.counts) return { ...fleissKappa(req.counts) };
      if (!req.data) throw new UsageError('invalid-input', 'give "counts" (units x categories) or "data" (coders x units)');
      const { categories, counts } = countsFromData(req.data);
      return { ...fleissKappa(counts, categories), categories };
    }
    case 'unitizing-alpha':
      return unitizing(req);
  }
}

function unitizing(req: Extract<Request, { statistic: 'unitizing-alpha' }>): Record<string, unknown> {
  const opts = req.coders ? { coders: req.coders } : {};
  if (req.variant === 'u1995') return { ...unitizingAlpha1995(req.units, req.continuum, opts) };
  const r = unitizingAlpha2016(req.units, req.continuum, opts);
  const base = { statistic: r.statistic, variant: req.variant, coders: r.coders, n: r.n };
  switch (req.variant) {
    case 'u':
      return { ...base, ...r.u };
    case 'binary-u':
      return { ...base, ...r.binary };
    case 'cu':
      return { ...base, ...r.cu, perValue: r.perValue };
    case 'k-u': {
      // One value when "category" names it; otherwise a map from each value to its (k)u-alpha.
      if (req.category !== undefined) {
        const one = r.perValue.find((v) => v.category === req.category);
        if (!one) throw new UsageError('invalid-input', `no units of category ${String(req.category)}`);
        return { ...base, ...one, perValue: r.perValue };
      }
      return { ...base, value: Object.fromEntries(r.perValue.map((v) => [String(v.category), v.value])), perValue: r.perValue };
    }
  }
}
