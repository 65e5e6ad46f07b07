/** Why a REFI-QDA file (.qdc, .qdpx) was refused. The message names the place where it can. */
export type ExchangeErrorCode =
  | 'not_zip' // a .qdpx that is not a ZIP archive
  | 'unsafe_path' // a ZIP entry naming a place outside the archive (../, absolute, drive letter)
  | 'too_large' // the file, an entry or the unpacked total is over its limit
  | 'no_project' // no project.qde in the archive
  | 'bad_xml' // not well-formed XML, or a DOCTYPE (entities are refused)
  | 'not_refi' // well-formed, but not a REFI-QDA codebook or project
  | 'missing_source' // a text source whose file is not in the archive
  | 'unsupported_source' // a source path outside the archive (relative://, absolute://)
  | 'bad_encoding' // a source file that is not UTF-8
  | 'bad_reference' // a GUID that names nothing, or a malformed GUID
  | 'bad_position'; // a selection outside its text

export class ExchangeError extends Error {
  override readonly name = 'ExchangeError';
  constructor(
    readonly code: ExchangeErrorCode,
    message: string,
  ) {
    super(message);
  }

  toJSON(): { code: ExchangeErrorCode; message: string } {
    return { code: this.code, message: this.message };
  }
}
