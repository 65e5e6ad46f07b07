/** The file formats the importers read. */
export type ImportFormat = 'text' | 'webvtt' | 'srt' | 'docx' | 'unknown';

export type ImportErrorCode =
  | 'too_large' // input bigger than the configured limit
  | 'unsupported_format' // no importer for this file
  | 'bad_encoding' // not valid text in the expected encoding
  | 'empty' // no words at all
  | 'bad_header' // WebVTT file without the WEBVTT signature line
  | 'bad_timing' // a cue timing line that cannot be read
  | 'timing_order' // a cue that ends before it starts
  | 'missing_timing' // a cue block without a timing line
  | 'bad_cue_text' // cue text that cannot be read without losing words
  | 'bad_timestamp' // a transcript timestamp out of range, such as [12:75]
  | 'not_zip' // a .docx that is not a ZIP archive
  | 'no_document' // a ZIP without a word-processing main document
  | 'bad_docx'; // the main document could not be read

/**
 * Why an import failed and where. `line` is 1-based (for DOCX: the paragraph number), or null when
 * the problem concerns the whole file; `column` is 1-based, when known. The message already names
 * the place, so it can be shown to the user as it is.
 */
export class ImportError extends Error {
  override readonly name = 'ImportError';
  readonly code: ImportErrorCode;
  readonly format: ImportFormat;
  readonly line: number | null;
  readonly column: number | undefined;

  constructor(init: {
    code: ImportErrorCode;
    format: ImportFormat;
    message: string;
    line?: number | null;
    column?: number;
    unit?: 'line' | 'paragraph';
    cause?: unknown;
  }) {
    const line = init.line ?? null;
    const where =
      line === null ? '' : `${init.unit ?? 'line'} ${line}${init.column === undefined ? '' : `, column ${init.column}`}: `;
    super(where + init.message, init.cause === undefined ? undefined : { cause: init.cause });
    this.code = init.code;
    this.format = init.format;
    this.line = line;
    this.column = init.column;
  }

  /** Plain fields for JSON answers and logs (an Error's message is not enumerable). */
  toJSON(): { code: ImportErrorCode; message: string; format: ImportFormat; line: number | null; column: number | null } {
    return { code: this.code, message: this.message, format: this.format, line: this.line, column: this.column ?? null };
  }
}
