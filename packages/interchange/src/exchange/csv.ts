/**
 * CSV as RFC 4180 describes it: fields separated by commas, records ended by CRLF, a field holding a
 * comma, a double quote, CR or LF enclosed in double quotes with inner quotes doubled. Files are UTF-8;
 * a byte order mark is written first so spreadsheet programs read non-Latin scripts correctly
 * (common practice; RFC 4180 itself says nothing about it).
 */
export const CSV_BOM = '\uFEFF';

export type CsvValue = string | number | boolean | null | undefined;

export function csvField(v: CsvValue): string {
  if (v === null || v === undefined) return '';
  const s = typeof v === 'string' ? v : String(v);
  return /[",\r\n]/.test(s) ? '"' + s.replace(/"/g, '""') + '"' : s;
}

export function csvRecord(values: readonly CsvValue[]): string {
  return values.map(csvField).join(',') + '\r\n';
}
