/**
 * What the standard has no field for is packed into `Description` elements as labelled sections
 * (spec §7 asks a tool to warn about losses; NOTES: a richer codebook "can recover them at import only
 * from its own packing"). The sections read well as plain text in any program:
 *
 *   brief definition
 *
 *   [Full definition]
 *   …
 *   [When to use]
 *   …
 *   [When not to use]
 *   …
 *   [Examples]
 *   - quoted words
 *   [Near-misses]
 *   - quoted words
 *   [Gloss]
 *   type: data-driven
 *   status: active
 */
const SECTIONS = ['Full definition', 'When to use', 'When not to use', 'Examples', 'Near-misses', 'Gloss'] as const;
type Section = (typeof SECTIONS)[number];
const HEADER = new RegExp(`^\\[(${SECTIONS.join('|')})\\]$`);

export interface PackedCode {
  briefDefinition: string;
  fullDefinition: string;
  inclusion: string;
  exclusion: string;
  examples: string[];
  nearMisses: string[];
  meta: Record<string, string>;
}

export function packCode(c: PackedCode): string {
  const parts: string[] = [c.briefDefinition.trim()];
  const section = (name: Section, body: string) => {
    if (body.trim()) parts.push(`[${name}]\n${body.trim()}`);
  };
  section('Full definition', c.fullDefinition);
  section('When to use', c.inclusion);
  section('When not to use', c.exclusion);
  section('Examples', c.examples.map((q) => `- ${q.replace(/\s*\n\s*/g, ' ')}`).join('\n'));
  section('Near-misses', c.nearMisses.map((q) => `- ${q.replace(/\s*\n\s*/g, ' ')}`).join('\n'));
  section('Gloss', Object.entries(c.meta).map(([k, v]) => `${k}: ${v}`).join('\n'));
  return parts.join('\n\n');
}

/** Reads a description written by packCode; any other description becomes the brief definition. */
export function unpackCode(description: string): PackedCode {
  const out: PackedCode = { briefDefinition: '', fullDefinition: '', inclusion: '', exclusion: '', examples: [], nearMisses: [], meta: {} };
  const bodies = new Map<Section | 'brief', string[]>([['brief', []]]);
  let current: Section | 'brief' = 'brief';
  for (const line of description.replace(/\r\n?/g, '\n').split('\n')) {
    const m = HEADER.exec(line.trim());
    if (m) {
      current = m[1] as Section;
      bodies.set(current, []);
    } else bodies.get(current)!.push(line);
  }
  const text = (k: Section | 'brief') => (bodies.get(k) ?? []).join('\n').trim();
  const list = (k: Section) => text(k).split('\n').map((l) => l.replace(/^- /, '').trim()).filter(Boolean);
  out.briefDefinition = text('brief');
  out.fullDefinition = text('Full definition');
  out.inclusion = text('When to use');
  out.exclusion = text('When not to use');
  out.examples = list('Examples');
  out.nearMisses = list('Near-misses');
  for (const l of text('Gloss').split('\n')) {
    const i = l.indexOf(':');
    if (i > 0) out.meta[l.slice(0, i).trim()] = l.slice(i + 1).trim();
  }
  return out;
}

/** A one-section description holding only Gloss's own facts (`[Gloss]` then `key: value` lines). */
export function packMeta(meta: Record<string, string>, lead = ''): string {
  return packCode({ briefDefinition: lead, fullDefinition: '', inclusion: '', exclusion: '', examples: [], nearMisses: [], meta });
}

export function unpackMeta(description: string | undefined): { lead: string; meta: Record<string, string> } {
  const u = unpackCode(description ?? '');
  return { lead: u.briefDefinition, meta: u.meta };
}
