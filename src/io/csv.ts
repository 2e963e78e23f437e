import { readFileSync, statSync } from 'node:fs';
import { gunzipSync } from 'node:zlib';
import { parse } from 'csv-parse/sync';
import { UserError } from '../core/errors.js';
import { shown } from '../core/text.js';
import { decodeUtf8 } from './utf8.js';

export { shown };

/** One CSV record with the 1-based line it starts on. */
export interface CsvRow {
  line: number;
  fields: string[];
}

/** Reads a whole file's text, turning a missing file or a folder into the one-line user error. */
export function readTextFile(file: string): string {
  let isFile = false;
  try {
    isFile = statSync(file).isFile();
  } catch {
    throw new UserError('file not found; check the path', { file });
  }
  if (!isFile) throw new UserError('is a folder, not a file; give a file', { file });
  if (!/\.gz$/i.test(file)) return decodeUtf8(readFileSync(file), file);
  let bytes: Buffer;
  try {
    bytes = gunzipSync(readFileSync(file));
  } catch {
    throw new UserError(
      'not a readable gzip file (damaged or cut short); compress it again or give the plain CSV',
      {
        file,
      },
    );
  }
  return decodeUtf8(bytes, file);
}

/** Parses CSV text into rows with line numbers. Empty lines are skipped; ragged rows are left to the caller. */
export function parseCsv(text: string, file: string): CsvRow[] {
  let records: string[][];
  try {
    records = parse(text, CSV_OPTIONS) as string[][];
  } catch (error) {
    const e = error as { lines?: number; message?: string };
    throw new UserError(`not valid CSV (${shown(String(e.message ?? error).split('\n')[0])})`, {
      file,
      line: e.lines,
    });
  }
  const rows: CsvRow[] = [];
  let line = 1;
  for (const fields of records) {
    const at = line;
    line += 1 + lineBreaksIn(fields);
    if (isBlankRecord(fields)) continue;
    rows.push({ line: at, fields });
  }
  return rows;
}

/**
 * The options every CSV read uses. Blank lines come through as `['']` records so that line numbers can be
 * counted here: csv-parse's own `info.lines` counts a skipped blank line and a quoted CRLF twice (measured with
 * csv-parse 6.2.1), which would point messages at the wrong row.
 */
export const CSV_OPTIONS = {
  relax_column_count: true,
  skip_empty_lines: false,
  bom: true,
  trim: true,
  // Any of the three line endings, mixed freely (csv-parse's automatic choice keeps the first one it meets).
  record_delimiter: ['\r\n', '\n', '\r'],
};

/** A record from a blank (or all-white-space) line. */
export function isBlankRecord(fields: readonly string[]): boolean {
  return fields.length === 1 && fields[0] === '';
}

/** Line breaks inside the fields of one record (quoted newlines): the record spans that many extra lines. */
export function lineBreaksIn(fields: readonly string[]): number {
  let breaks = 0;
  for (let i = 0; i < fields.length; i++) {
    const f = fields[i];
    if (f.indexOf('\n') < 0 && f.indexOf('\r') < 0) continue;
    // Invariant: breaks counts CRLF, LF and lone CR each once, over the characters before j.
    for (let j = 0; j < f.length; j++) {
      const c = f.charCodeAt(j);
      if (c === 10) breaks++;
      else if (c === 13 && f.charCodeAt(j + 1) !== 10) breaks++;
    }
  }
  return breaks;
}

/** Quotes a CSV field when it needs it (comma, quote, newline, or surrounding space). */
export function csvField(value: string): string {
  if (/[",\n\r]/.test(value) || value !== value.trim()) return `"${value.replace(/"/g, '""')}"`;
  return value;
}

/** Formats a number for CSV: shortest text that reads back to the same double; `inf` for +Infinity. */
export function csvNumber(value: number): string {
  if (value === Infinity) return 'inf';
  if (value === -Infinity) return '-inf';
  return String(value);
}

/**
 * Whether `text` (already trimmed) is written as a decimal number, the only form a data file may use.
 * JavaScript's Number() also reads `0x1A` (26), `0b1`, `0o7`, `Infinity` and text that is only white space
 * (as 0); each of those is refused. Cheap enough for every field: two character tests and, for a leading
 * zero, a third. A decimal number starts with a digit, a sign or a point and ends with a digit or a point.
 */
export function isDecimalText(text: string): boolean {
  const n = text.length;
  if (n === 0) return false;
  const first = text.charCodeAt(0);
  const last = text.charCodeAt(n - 1);
  if (!((first >= 48 && first <= 57) || first === 43 || first === 45 || first === 46)) return false;
  if (!((last >= 48 && last <= 57) || last === 46)) return false;
  // 0x…, 0b…, 0o… (Number() reads them unsigned only, so the prefix is at the start).
  if (first === 48 && n > 2) {
    const second = text.charCodeAt(1) | 0x20;
    if (second === 0x78 || second === 0x62 || second === 0x6f) return false;
  }
  return true;
}

/** Parses a numeric CSV field, or throws the one-line error naming file, line and column. */
export function parseNumberField(
  text: string,
  where: { file: string; line: number; column: string },
  allow: { infinite?: boolean } = {},
): number {
  const t = text.trim().toLowerCase();
  if (allow.infinite && (t === 'inf' || t === '+inf' || t === 'infinity' || t === '+infinity'))
    return Infinity;
  const infinite = /^[+-]?inf(inity)?$/.test(t);
  const value = infinite
    ? t.startsWith('-')
      ? -Infinity
      : Infinity
    : isDecimalText(t)
      ? Number(t)
      : Number.NaN;
  if (Number.isNaN(value)) {
    const hint = /^0[xbo]/.test(t) ? ' (write numbers in decimal)' : '';
    throw new UserError(`'${shown(text)}' is not a number in column ${shown(where.column)}${hint}`, where);
  }
  if (!Number.isFinite(value)) {
    throw new UserError(`'${shown(text)}' is not a finite number in column ${shown(where.column)}`, where);
  }
  return value;
}
