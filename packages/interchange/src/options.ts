/** Options shared by every importer. */
export interface ImportOptions {
  /** Refuse inputs bigger than this many bytes. Default {@link DEFAULT_MAX_BYTES}. */
  maxBytes?: number;
  /** Called with a fraction in [0, 1], rising, ending with 1 on success. */
  onProgress?: (fraction: number) => void;
  /** Title for the transcript; `importTranscript` defaults it to the file name without extension. */
  title?: string;
  /**
   * WebVTT and SRT: merge consecutive cues of the same named speaker into one turn (default true).
   * Captions cut one utterance into many short cues; coders code utterances, so one turn per speaker
   * run is what they expect. Cues without a speaker are never merged.
   */
  mergeCues?: boolean;
  /**
   * Text encoding of plain-text and SRT input when it has no byte order mark, as a WHATWG encoding
   * label (default 'utf-8', decoded strictly). WebVTT is always UTF-8, as its specification requires.
   */
  encoding?: string;
}

/** 25 MiB: far above any interview transcript, small enough to parse in memory. */
export const DEFAULT_MAX_BYTES = 25 * 1024 * 1024;
