/**
 * Pure: resolved segments of the given layers plus each segment's flag kinds, in the shape
 * `GET /api/texts/:id/segments` answers. The flags are computed over the layers of those counted as
 * coders of the text (agreement/coders.ts: by default whoever applied a code; a round passes its
 * participants), the same rule the agreement report uses. Layers outside rounds, a round's coder
 * layers and a consensus layer are flagged each among their own kind: a coder's round layer and their
 * own layer outside it are not two coders, nor duplicates of each other.
 */
import { computeFlags, concatDecoded, listSegments, resolveDecodedSegments, resolveSegments, type DecodedAnchors, type Flag, type LayerSource, type ResolvedSegment, type SegmentRecord } from '@gloss/model';
import type * as Y from 'yjs';
import { countedOn, decideCoders, type CoderChoice } from '../agreement/coders.js';
import { comparedAs, type VisibleLayer } from '../http/text-layers.js';

export interface SegmentOut {
  id: string;
  /** null: a segment of a round's consensus layer. */
  coderId: string | null;
  /** The layer's room, its round (null outside rounds) and kind. */
  layer: string;
  round: string | null;
  kind: 'coder' | 'consensus';
  codeId: string;
  start: number;
  end: number;
  quote: string;
  flags: string[];
}

/**
 * The flags of one group of layers (`group` names it: '' for layers outside rounds, a round id, or
 * `consensus:<layer>`). The default computes them afresh; the text cache (segments/text-cache.ts) keeps
 * one live engine per group and refreshes it incrementally.
 */
export type GroupFlags = (group: string, layers: LayerSource[]) => Flag[];

/** Each layer's segment records and their resolution, in the same order. */
export interface LayerResolution {
  records: SegmentRecord[];
  resolved: ResolvedSegment[];
}

/**
 * Reads and resolves the layers' segments. The default reads every layer and resolves them all in one
 * walk of the text; the text cache keeps each layer's result while neither it nor the text changed.
 */
export type ResolveLayers = (textDoc: Y.Doc, layers: ReadonlyArray<VisibleLayer & { doc: Y.Doc }>) => LayerResolution[];

export const resolveLayers: ResolveLayers = (textDoc, layers) => resolveRecords(textDoc, layers.map((l) => listSegments(l.doc)));

/**
 * Resolves layers' records (from `listSegments`) in one walk of the text. `decoded`: each layer's anchors
 * already read (`decodeAnchors(segmentAnchors(records[i]))`), which the text cache keeps while a layer
 * does not move, so a text correction re-walks the text without reading 20,000 anchors' bytes again.
 */
export function resolveRecords(textDoc: Y.Doc, records: readonly SegmentRecord[][], decoded?: readonly DecodedAnchors[]): LayerResolution[] {
  // No turns: the answer does not carry them, and finding each segment's turn cost a search per segment.
  const all = records.flat();
  const resolved = decoded ? resolveDecodedSegments(textDoc, all, concatDecoded(decoded), []) : resolveSegments(textDoc, all, []);
  let k = 0;
  return records.map((r) => ({ records: r, resolved: resolved.slice(k, (k += r.length)) }));
}

/**
 * The groups of layers flagged together (`group` as in GroupFlags) and, in each, the layers of those
 * counted as coders (agreement/coders.ts). `perLayer` gives each layer's records (their count decides
 * who counts by default).
 */
export function flagGroups(layers: ReadonlyArray<VisibleLayer & { doc: Y.Doc }>, perLayer: readonly LayerResolution[], choice: CoderChoice = {}): Array<{ key: string; sources: LayerSource[] }> {
  const groups = new Map<string, Array<[VisibleLayer & { doc: Y.Doc }, number]>>();
  layers.forEach((l, i) => {
    const key = l.coderId === null ? `consensus:${l.layerDocId}` : (l.roundId ?? '');
    groups.set(key, [...(groups.get(key) ?? []), [l, perLayer[i]!.records.length]]);
  });
  return [...groups.entries()].map(([key, group]) => {
    const counted = countedOn(decideCoders([{ textId: '', layers: group.map(([l, segments]) => ({ coderId: comparedAs(l), segments })) }], key === '' ? choice : {}), '');
    const flagged = group.filter(([l]) => counted.includes(comparedAs(l)));
    return { key, sources: flagged.map(([l]) => ({ layerId: l.layerDocId, coder: comparedAs(l), doc: l.doc })) };
  });
}

export const cmp = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);

export function segmentsWithFlags(
  textDoc: Y.Doc,
  codebook: Y.Doc,
  layers: Array<VisibleLayer & { doc: Y.Doc }>,
  choice: CoderChoice = {},
  groupFlags: GroupFlags = (_group, sources) => computeFlags({ textDoc, codebook, layers: sources }),
  resolve: ResolveLayers = resolveLayers,
): SegmentOut[] {
  const perLayer = resolve(textDoc, layers);
  const flags = flagGroups(layers, perLayer, choice).flatMap(({ key, sources }) => groupFlags(key, sources));
  // each segment's flag kinds, by layer then segment id (no composite string keys: 10,000s of them)
  const kinds = new Map<string, Map<string, string[]>>();
  for (const f of flags) {
    for (const ref of f.segments) {
      let byId = kinds.get(ref.layerId);
      if (!byId) kinds.set(ref.layerId, (byId = new Map()));
      const list = byId.get(ref.segmentId);
      if (!list) byId.set(ref.segmentId, [f.kind]);
      else if (!list.includes(f.kind)) list.push(f.kind);
    }
  }
  const out: SegmentOut[] = [];
  layers.forEach((l, i) => {
    const byId = kinds.get(l.layerDocId);
    const kind = l.coderId === null ? 'consensus' : 'coder';
    const round = l.roundId ?? null;
    for (const s of perLayer[i]!.resolved) {
      if (s.unresolved) continue; // names text this server has not stored: nothing true to say about it
      out.push({
        id: s.id,
        coderId: l.coderId,
        layer: l.layerDocId,
        round,
        kind,
        codeId: s.codeId,
        start: s.start,
        end: s.end,
        quote: s.quote,
        flags: byId?.get(s.id)?.slice().sort() ?? [],
      });
    }
  });
  return out.sort((a, b) => a.start - b.start || a.end - b.end || cmp(a.coderId ?? '', b.coderId ?? '') || cmp(a.layer, b.layer) || cmp(a.id, b.id));
}
