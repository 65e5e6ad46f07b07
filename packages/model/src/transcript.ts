/**
 * A transcript as importers produce it and as the text document is built from it.
 * Plain data, no Yjs: `interchange` parses files into this; `model` turns it into a text document.
 */
export interface TranscriptTurn {
  /** Speaker label as written in the source (`I`, `P03`, `Dana`), or null when the source has none. */
  speaker: string | null;
  /** Start time in milliseconds from the start of the recording, or null when the source has none. */
  startMs: number | null;
  /** End time in milliseconds, when the source gives one (WebVTT, SRT cues). */
  endMs: number | null;
  /** The words of the turn, without the speaker prefix or timestamp. */
  text: string;
}

export interface Transcript {
  title?: string;
  turns: TranscriptTurn[];
}
