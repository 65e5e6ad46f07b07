/**
 * The agreement report as the server sends it (apps/server/src/http/agreement.ts): the study's
 * `GET /api/studies/:id/agreement` and a round's `GET /api/rounds/:id/agreement` share one shape.
 * A reflexive study gets `coefficients: null` and the units coded differently instead.
 */
import { call, enc } from './client.js';

export interface Coefficient {
  statistic: string;
  value: number | null;
  reason?: string;
  band?: string;
  ci?: [number, number] | null;
  detail?: Record<string, unknown>;
}

export interface Difference {
  textId: string;
  start: number;
  end: number;
  quote: string;
  byCoder: Array<{ coderId: string; codeIds: string[] }>;
}

interface Head {
  mode?: string;
  unit: string;
  coders: Array<{ id: string; name: string }>;
  texts: Array<{ id: string; title: string }>;
  codes: Array<{ id: string; label: string }>;
}

export interface CoefficientReport extends Head {
  kind: 'coefficients';
  statistic: string;
  method?: string;
  pooled: Coefficient;
  perCode: Array<{ codeId: string; result: Coefficient }>;
  perText: Array<{ textId: string; result: Coefficient }>;
  perCoderPair: Array<{ coders: [string, string]; result: Coefficient }>;
}

export interface ReflexiveReport extends Head {
  kind: 'differences';
  note: string;
  differences: Difference[];
}

export type AgreementReport = CoefficientReport | ReflexiveReport;

export interface AgreementOptions {
  unit?: string;
  statistic?: string;
  bootstrap?: number;
  seed?: number;
}

/** Tells the two shapes apart by what the server sent, never by what the client hopes the mode is. */
export function toAgreementReport(v: unknown): AgreementReport {
  const j = (v ?? {}) as Record<string, unknown>;
  const head: Head = {
    mode: typeof j.mode === 'string' ? j.mode : undefined,
    unit: String(j.unit ?? ''),
    coders: Array.isArray(j.coders) ? (j.coders as Head['coders']) : [],
    texts: Array.isArray(j.texts) ? (j.texts as Head['texts']) : [],
    codes: Array.isArray(j.codes) ? (j.codes as Head['codes']) : [],
  };
  if (j.coefficients === null || Array.isArray(j.differences)) {
    return { ...head, kind: 'differences', note: String(j.note ?? ''), differences: Array.isArray(j.differences) ? (j.differences as Difference[]) : [] };
  }
  return {
    ...head,
    kind: 'coefficients',
    statistic: String(j.statistic ?? ''),
    method: typeof j.method === 'string' ? j.method : undefined,
    pooled: (j.pooled ?? { statistic: '', value: null }) as Coefficient,
    perCode: Array.isArray(j.perCode) ? (j.perCode as CoefficientReport['perCode']) : [],
    perText: Array.isArray(j.perText) ? (j.perText as CoefficientReport['perText']) : [],
    perCoderPair: Array.isArray(j.perCoderPair) ? (j.perCoderPair as CoefficientReport['perCoderPair']) : [],
  };
}

function query(o: AgreementOptions): string {
  const q = new URLSearchParams();
  if (o.unit) q.set('unit', o.unit);
  if (o.statistic) q.set('statistic', o.statistic);
  if (o.bootstrap) q.set('bootstrap', String(o.bootstrap));
  if (o.seed !== undefined) q.set('seed', String(o.seed));
  const s = q.toString();
  return s ? `?${s}` : '';
}

export const agreementApi = {
  study: async (studyId: string, o: AgreementOptions = {}): Promise<AgreementReport> =>
    toAgreementReport(await call('GET', `/api/studies/${enc(studyId)}/agreement${query(o)}`)),
  round: async (roundId: string, o: AgreementOptions = {}): Promise<AgreementReport> =>
    toAgreementReport(await call('GET', `/api/rounds/${enc(roundId)}/agreement${query(o)}`)),
};
