/**
 * Deciding whether `Something:` at the start of a line names a speaker or is an ordinary sentence
 * with a colon ("The reason is simple: ..."). A candidate must be short (at most 3 words, 40
 * characters), start with a capital letter, and hold no sentence punctuation; it is then accepted
 * when it looks like a code (`I`, `R`, `P03`, `INT`), a role word (`Interviewer 2`), recurs in the file,
 * or reads as a name of up to 3 capitalised words that is not a common sentence opener or a
 * heading word such as `Note` or `Date`.
 */

export interface LabelCandidate {
  /** The label as written, trimmed. */
  label: string;
  /** Index just past the colon. */
  end: number;
  /** A bracketed timestamp written between the label and the colon (`I [00:01:02]:`), if any. */
  stamp?: { text: string; index: number };
}

// A label word: capitalised letters with inner apostrophes, dots and hyphens, or a number.
// Scripts without case (Chinese, Japanese, Arabic, ...) have no capitals: a short word of them counts.
const WORD = String.raw`[\p{Lu}\p{Lt}][\p{L}\p{M}\d'’.\-]*|\p{Lo}[\p{Lo}\p{M}]{0,7}(?![\p{L}])|\d+[\p{L}]?|[\p{Ll}]{1,5}`;
const STAMP = String.raw`[\[(]\s*\d{1,2}:\d{2}(?::\d{2})?(?:[.,]\d{1,3})?\s*[\])]`;
const CANDIDATE = new RegExp(
  String.raw`^(${WORD})((?:[ \t]+(?:${WORD})){0,2})[ \t]*(${STAMP})?[ \t]*(?::(?=\s|$)|：)`, // ASCII or fullwidth colon
  'u',
);

/** The speaker candidate at the start of `s`, or null. */
export function matchLabelCandidate(s: string): LabelCandidate | null {
  const m = CANDIDATE.exec(s);
  if (!m) {
    // Role words are speakers in any case: "interviewer:", "RESPONDENT 2:".
    const r = LOWER_ROLE.exec(s);
    return r ? { label: r[1]!.replace(/[ \t]+/g, ' '), end: r[0].length } : null;
  }
  const label = shortLabel(m[1]! + m[2]!);
  if (label === null) return null;
  const out: LabelCandidate = { label, end: m[0].length };
  if (m[3]) out.stamp = { text: m[3], index: m.index + m[0].indexOf(m[3], m[1]!.length) };
  return out;
}

const HEADING = new RegExp(
  String.raw`^(${WORD})((?:[ \t]+(?:${WORD})){0,2})[ \t]+([[(]?\d{1,2}:\d{2}(?::\d{2})?(?:[.,]\d{1,3})?[\])]?)[ \t]*$`,
  'u',
);

/**
 * A line holding only a speaker and a time, with the words on the following lines, as transcription
 * services export them: `Dana Whitfield  0:03`. Returns the label and the time as written.
 */
export function matchSpeakerHeading(s: string): { label: string; stamp: string; stampIndex: number } | null {
  const m = HEADING.exec(s);
  if (!m) return null;
  const label = shortLabel(m[1]! + m[2]!);
  return label === null ? null : { label, stamp: m[3]!, stampIndex: m[0].lastIndexOf(m[3]!) };
}

/** The label normalised, if it is short and capitalised as a speaker label must be. */
function shortLabel(raw: string): string | null {
  const label = raw.trim().replace(/[ \t]+/g, ' ');
  if (label.length > 40) return null;
  const words = label.split(' ');
  // Lowercase words are allowed only as name particles ("Ana de Souza"), never first or last.
  const first = words[0]!;
  const last = words[words.length - 1]!;
  if (!/^[\p{Lu}\p{Lt}\p{Lo}]/u.test(first)) return null;
  if (words.length > 1 && /^\p{Ll}/u.test(last)) return null;
  if (words.some((w) => /^\p{Ll}/u.test(w) && !PARTICLES.has(w))) return null;
  return label;
}

const PARTICLES = new Set(['de', 'da', 'do', 'dos', 'das', 'del', 'della', 'di', 'du', 'van', 'von', 'der', 'den', 'la', 'le', 'bin', 'bint', 'al', 'el', 'ter', 'ten', 'y']);

/** `I`, `R`, `Q`, `A`, `P03`, `R2`, `INT`, `IV1`: transcription codes for speakers. */
export function isCodeLabel(label: string): boolean {
  return /^[A-Z]{1,4}\d{0,3}$/.test(label) || ROLE.test(label);
}

const ROLE_WORDS = 'Interviewer|Interviewee|Participant|Respondent|Moderator|Facilitator|Speaker|Researcher|Informant|Student|Teacher|Nurse|Patient|Parent|Child|Doctor';
const ROLE = new RegExp(`^(?:${ROLE_WORDS})(?: \\d{1,3}| [A-Z])?$`, 'i');
const LOWER_ROLE = new RegExp(`^((?:${ROLE_WORDS})(?:[ \\t]+(?:\\d{1,3}|[A-Za-z]))?)[ \\t]*:(?=\\s|$)`, 'i');

// Words that open sentences, headings or metadata lines, never a speaker on their own.
const NOT_NAMES = new Set(
  (
    'a an the this that these those it its he she we they you my our your their his her ' +
    'and but or so yes no ok okay well anyway then also however therefore because since although though ' +
    'note notes nb ps example examples question questions answer answers summary update reminder warning tip tips ' +
    'result results reason problem conclusion background context location place date time duration day ' +
    'subject title topic theme re remember listen look like first second third finally basically honestly ' +
    'actually seriously meaning definition edit quote source transcript recording present attendees ' +
    'participants interviewers project study file page chapter section part step total key important here there ' +
    'what why how when where who which if as for in on at to of by with from about after before during ' +
    'translation comment comments right sure true false fine exactly great good bad oh ah um uh hmm wait sorry ' +
    'thanks please again later now today yesterday tomorrow once never always sometimes maybe perhaps plus still ' +
    'yet even just only really very mostly usually anyhow besides otherwise instead meanwhile apparently obviously ' +
    'clearly unfortunately luckily hopefully interestingly'
  ).split(' '),
);

/** True when the label reads as a person's name or initials rather than a sentence opener. */
export function looksLikeName(label: string): boolean {
  const words = label.split(' ');
  if (words.length > 3) return false;
  if (NOT_NAMES.has(words[0]!.toLowerCase().replace(/[.]$/, ''))) return false;
  return words.every((w) => /^[\p{Lu}\p{Lt}\p{Lo}][\p{L}\p{M}\d'’.\-]*$/u.test(w) || PARTICLES.has(w) || /^\d+$/.test(w));
}

/**
 * Accepts or rejects candidates given how often each candidate occurs in the whole file, so a label
 * like `Maria Santos` that recurs is taken even if it were unusual, while a one-off opener is not.
 */
export class SpeakerJudge {
  constructor(private readonly counts: ReadonlyMap<string, number>) {}

  accepts(label: string): boolean {
    if (isCodeLabel(label)) return true;
    if (NOT_NAMES.has(label.split(' ')[0]!.toLowerCase().replace(/[.]$/, ''))) return false;
    if ((this.counts.get(label) ?? 0) >= 2) return true;
    return looksLikeName(label);
  }

  static fromLines(lines: Iterable<string>, candidateOf: (line: string) => string | null): SpeakerJudge {
    const counts = new Map<string, number>();
    for (const line of lines) {
      const label = candidateOf(line);
      if (label !== null) counts.set(label, (counts.get(label) ?? 0) + 1);
    }
    return new SpeakerJudge(counts);
  }
}
