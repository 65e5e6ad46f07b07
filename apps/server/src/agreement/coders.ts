/**
 * Who counts as a coder of each text — the one rule every comparison and count on the server uses
 * (the agreement report and its per-text and per-pair figures, the "coders differ" flag, progress).
 *
 * A layer row exists as soon as someone who may code opens a text (`GET /api/texts/:id` hands them the
 * room of their own layer), so "has a layer" says nothing about coding: a lead who only looked would
 * otherwise count as a coder who applied no code anywhere. The rules, first match wins:
 *
 * - `listed`: an explicit list (the report's `coders=`) is the last word. A listed person with a layer
 *   on the text is counted even if they applied nothing (that is what was asked); a listed person with
 *   no layer on the text is left out there (missing, not "applied nothing"); anyone else is left out.
 * - `participants`: a round's participants (the rounds code passes theirs). A participant with a layer
 *   on the text is counted even with no codes (in a round, coding nothing is a judgement); anyone who
 *   is not a participant is left out, and so is a participant with no layer on the text.
 * - `applied-codes` (the default): whoever applied at least one code on the text (a segment in their
 *   layer); an empty layer is left out as "no codes applied".
 *
 * Pure: the caller counts each layer's segments (from the documents, not the projection, which may lag).
 */

export type CoderRule = 'listed' | 'participants' | 'applied-codes';

/** One person's layer on a text and how many segments it holds now. */
export interface LayerCount {
  coderId: string;
  segments: number;
}

export interface TextLayers {
  textId: string;
  layers: readonly LayerCount[];
}

export interface CoderChoice {
  /** An explicit list (wins over everything else); order is kept in the result. */
  coders?: readonly string[] | undefined;
  /** A round's participants (used when no explicit list is given). */
  participants?: readonly string[] | undefined;
}

export type LeftOutReason = 'no-codes' | 'not-listed' | 'not-participant' | 'no-layer';

export interface LeftOut {
  coderId: string;
  reason: LeftOutReason;
  /** The reason in plain words, for people and reports. */
  message: string;
}

export interface TextCoders {
  textId: string;
  counted: string[];
  leftOut: LeftOut[];
}

export interface CoderDecision {
  rule: CoderRule;
  /** The rule in plain words. */
  description: string;
  /**
   * Everyone counted on at least one text: the explicit list as given (even someone counted nowhere),
   * else the participants who are counted somewhere, else the counted coders in order of first appearance.
   */
  coders: string[];
  perText: TextCoders[];
}

export const LEFT_OUT_MESSAGES: Record<LeftOutReason, string> = {
  'no-codes': 'not counted: no codes applied',
  'not-listed': 'not counted: not in the coders= list',
  'not-participant': 'not counted: not a participant of this round',
  'no-layer': 'not counted: has no layer on this text',
};

const DESCRIPTIONS: Record<CoderRule, string> = {
  listed: 'The coders named in coders=: each is counted on every text where they have a layer, even with no codes applied there.',
  participants: "The round's participants: each is counted on every text where they have a layer, even with no codes applied there.",
  'applied-codes': 'Everyone who applied at least one code on a text is counted on that text; opening a text without coding does not count.',
};

const leftOut = (coderId: string, reason: LeftOutReason): LeftOut => ({ coderId, reason, message: LEFT_OUT_MESSAGES[reason] });

/** Decides, per text, who is counted as a coder and who is left out and why (see the rules above). */
export function decideCoders(texts: readonly TextLayers[], choice: CoderChoice = {}): CoderDecision {
  const rule: CoderRule = choice.coders ? 'listed' : choice.participants ? 'participants' : 'applied-codes';
  const wanted = choice.coders ?? choice.participants;
  const perText = texts.map((t): TextCoders => {
    const counted: string[] = [];
    const out: LeftOut[] = [];
    const seen = new Set<string>();
    for (const l of t.layers) {
      if (seen.has(l.coderId)) continue; // one layer per person and text; a duplicate row changes nothing
      seen.add(l.coderId);
      if (wanted) {
        if (wanted.includes(l.coderId)) counted.push(l.coderId);
        else out.push(leftOut(l.coderId, rule === 'listed' ? 'not-listed' : 'not-participant'));
      } else if (l.segments > 0) counted.push(l.coderId);
      else out.push(leftOut(l.coderId, 'no-codes'));
    }
    if (wanted) {
      for (const id of wanted) if (!seen.has(id)) out.push(leftOut(id, 'no-layer'));
      // the list's order, so per-text figures read the same way as the list
      counted.sort((a, b) => wanted.indexOf(a) - wanted.indexOf(b));
    }
    return { textId: t.textId, counted, leftOut: out };
  });
  const anywhere = new Set(perText.flatMap((t) => t.counted));
  const coders = choice.coders ? [...new Set(choice.coders)] : choice.participants ? [...new Set(choice.participants)].filter((id) => anywhere.has(id)) : [...anywhere];
  return { rule, description: DESCRIPTIONS[rule], coders, perText };
}

/** The counted coders of one text in a decision (empty when the text is not in it). */
export function countedOn(decision: CoderDecision, textId: string): string[] {
  return decision.perText.find((t) => t.textId === textId)?.counted ?? [];
}
