/**
 * One agreement computation for the study report and a round's report (DESIGN §5): the given layers
 * of the given texts, who counts decided by agreement/coders.ts (an explicit list, a round's
 * participants, or whoever applied a code), the asked-for unit and statistic. In a study run in the
 * reflexive mode no coefficient is computed: the units coded differently, side by side.
 */
import { type Db, type StudyMode, users } from '@gloss/db';
import { effectiveCodeId, getCodes, listSegments, readText, readTurns, resolveSegments } from '@gloss/model';
import { AgreementError } from '@gloss/agreement';
import { inArray } from 'drizzle-orm';
import type * as Y from 'yjs';
import { HttpError } from '../errors.js';
import { withDocs, type DocLoader } from '../projection/load-doc.js';
import { countedOn, decideCoders, type CoderChoice } from './coders.js';
import type { TextInput } from './data.js';
import { differences } from './differences.js';
import { inlineHeavy, type HeavyWork } from '../heavy/pool.js';
import type { Statistic } from './statistics.js';
import { fixedUnits, type UnitKind } from './units.js';

export interface AgreementRequest {
  studyId: string;
  mode: StudyMode;
  /** In report order. */
  texts: Array<{ id: string; title: string; textDocId: string }>;
  /** The layers compared (each with a coder); who of them counts is `choice`'s to decide. */
  layers: Array<{ id: string; textId: string; coderId: string }>;
  choice: CoderChoice;
  codebookDocId: string | null;
  unit: UnitKind;
  statistic: Statistic;
  codes?: string[] | undefined;
  bootstrap?: { replicates: number; seed: number; scheme?: 'texts' | 'units' } | undefined;
}

export const REFLEXIVE_NOTE =
  'This study is run in the reflexive mode: no agreement coefficient is computed. Units coded differently are listed side by side for discussion.';

/**
 * The report body (the study agreement's shape) and the coders counted. The coefficients (and their
 * bootstrap, up to 10,000 replicates) are computed by `heavy`: a worker thread in the server, so a long
 * report never stalls sync; in place for the command line.
 */
export async function computeAgreement(db: Db, store: DocLoader, req: AgreementRequest, heavy: HeavyWork = inlineHeavy()): Promise<{ body: Record<string, unknown>; coderIds: string[] }> {
  const { texts: textRows, layers: layerDocs, codebookDocId: cbId } = req;
  const ids = [...textRows.map((t) => t.textDocId), ...layerDocs.map((d) => d.id), ...(cbId ? [cbId] : [])];
  let coderIds: string[] = [];
  const body = await withDocs(store, ids, async (loaded) => {
    const textYs = loaded.slice(0, textRows.length);
    const layerSegments = loaded.slice(textRows.length, textRows.length + layerDocs.length).map((y) => listSegments(y));
    const decision = decideCoders(
      textRows.map((t) => ({
        textId: t.id,
        layers: layerDocs.flatMap((d, j) => (d.textId === t.id ? [{ coderId: d.coderId, segments: layerSegments[j]!.length }] : [])),
      })),
      req.choice,
    );
    coderIds = decision.coders;
    const names = await coderNames(db, [...new Set([...coderIds, ...decision.perText.flatMap((t) => t.leftOut.map((l) => l.coderId))])]);
    if (!req.choice.coders) coderIds.sort((a, b) => (names.get(a) ?? '').localeCompare(names.get(b) ?? '') || (a < b ? -1 : 1));
    const person = (id: string) => ({ id, name: names.get(id) ?? '' });
    const cb: Y.Doc | undefined = cbId ? loaded[loaded.length - 1] : undefined;
    const effective = (codeId: string) => (cb ? effectiveCodeId(cb, codeId) : codeId);
    const unitKind = req.unit === 'span' || req.unit === 'character' ? 'turn' : req.unit;
    const inputs: TextInput[] = textRows.map((t, i) => {
      const textDoc = textYs[i]!;
      const text = readText(textDoc);
      const turns = readTurns(textDoc);
      const counted = countedOn(decision, t.id);
      const segments: TextInput['segments'][number][] = [];
      layerDocs.forEach((d, j) => {
        if (d.textId !== t.id || !counted.includes(d.coderId)) return;
        for (const s of resolveSegments(textDoc, layerSegments[j]!, turns)) {
          // Collapsed (orphaned) segments cover no text; unresolved ones cannot be placed.
          if (s.unresolved || s.end <= s.start) continue;
          segments.push({ coderId: d.coderId, codeId: effective(s.codeId), start: s.start, end: s.end });
        }
      });
      const own = coderIds.filter((c) => counted.includes(c));
      // Units: the asked-for fixed units; speaker turns for showing differences at character or span level.
      return { textId: t.id, textLength: text.length, text, units: fixedUnits(unitKind, text, turns), coders: own, segments };
    });
    const codebookCodes = cb ? getCodes(cb) : [];
    const labels = new Map(codebookCodes.map((k) => [k.id, k.label]));
    const codes = req.codes ?? usedCodes(inputs, coderIds, codebookCodes.map((k) => k.id));
    const head = {
      studyId: req.studyId,
      mode: req.mode,
      unit: req.unit,
      coders: coderIds.map(person),
      coderRule: { rule: decision.rule, description: decision.description },
      textCoders: decision.perText.map((pt) => ({
        textId: pt.textId,
        counted: pt.counted.map(person),
        leftOut: pt.leftOut.map((l) => ({ ...person(l.coderId), reason: l.reason, message: l.message })),
      })),
      texts: textRows.map((t) => ({ id: t.id, title: t.title })),
      codes: codes.map((id) => ({ id, label: labels.get(id) ?? '' })),
    };
    if (req.mode === 'reflexive') {
      return { ...head, coefficients: null, note: REFLEXIVE_NOTE, differences: differences(inputs, codes, coderIds) };
    }
    const report = await heavy.run('agreement', {
      unit: req.unit,
      statistic: req.statistic,
      texts: inputs,
      codes,
      coders: coderIds,
      ...(req.bootstrap && req.bootstrap.replicates > 0 ? { bootstrap: req.bootstrap } : {}),
    });
    return {
      ...head,
      method:
        req.unit === 'span'
          ? "Krippendorff's unitizing alpha (1995/2004) over the coders' segments, overlaps within one coder and code merged; texts laid end to end."
          : `Each (text, code, ${req.unit}) is a unit valued 1 when the coder applied the code to it (any shared character), 0 otherwise; a coder not counted on a text (textCoders says who and why) is missing there. Nominal level.`,
      ...report,
    };
  }).catch((err: unknown) => {
    if (err instanceof AgreementError) throw new HttpError(400, 'bad_request', err.message);
    throw err;
  });
  return { body, coderIds };
}

/** Codes applied by the chosen coders, in codebook order (codes missing from the codebook last). */
function usedCodes(inputs: TextInput[], coders: string[], codebookOrder: string[]): string[] {
  const used = new Set<string>();
  const wanted = new Set(coders);
  for (const t of inputs) for (const s of t.segments) if (wanted.has(s.coderId)) used.add(s.codeId);
  const rank = new Map(codebookOrder.map((id, i) => [id, i]));
  return [...used].sort((a, b) => (rank.get(a) ?? 1e9) - (rank.get(b) ?? 1e9) || (a < b ? -1 : 1));
}

async function coderNames(db: Db, ids: string[]): Promise<Map<string, string>> {
  if (ids.length === 0) return new Map();
  const rows = await db.select({ id: users.id, name: users.name }).from(users).where(inArray(users.id, ids));
  return new Map(rows.map((r) => [r.id, r.name]));
}
