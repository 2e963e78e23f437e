import { readFileSync, statSync } from 'node:fs';
import { parse } from 'csv-parse/sync';
import { UserError } from '../core/errors.js';

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
  return readFileSync(file, 'utf8');
}

/** Parses CSV text into rows with line numbers. Empty lines are skipped; ragged rows are left to the caller. */
export function parseCsv(text: string, file: string): CsvRow[] {
  let records: Array<{ record: string[]; info: { lines: number } }>;
  try {
    records = parse(text, {
      info: true,
      relax_column_count: true,
      skip_empty_lines: true,
      bom: true,
      trim: true,
    }) as unknown as Array<{ record: string[]; info: { lines: number } }>;
  } catch (error) {
    const e = error as { lines?: number; message?: string };
    throw new UserError(`not valid CSV (${String(e.message ?? error).split('\n')[0]})`, { file, line: e.lines });
  }
  return records.map((r) => ({ line: r.info.lines, fields: r.record }));
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

/** Parses a numeric CSV field, or throws the one-line error naming file, line and column. */
export function parseNumberField(
  text: string,
  where: { file: string; line: number; column: string },
  allow: { infinite?: boolean } = {},
): number {
  const t = text.trim().toLowerCase();
  if (allow.infinite && (t === 'inf' || t === '+inf' || t === 'infinity' || t === '+infinity')) return Infinity;
  const infinite = /^[+-]?inf(inity)?$/.test(t);
  const value = t === '' ? Number.NaN : infinite ? (t.startsWith('-') ? -Infinity : Infinity) : Number(t);
  if (Number.isNaN(value)) {
    throw new UserError(`'${shown(text)}' is not a number in column ${shown(where.column)}`, where);
  }
  if (!Number.isFinite(value)) {
    throw new UserError(`'${shown(text)}' is not a finite number in column ${shown(where.column)}`, where);
  }
  return value;
}

/**
 * User text as it goes into a one-line message: control characters (newlines, tabs, NUL) escaped and long
 * text cut to 60 characters, so the message stays one readable line whatever the file held.
 */
export function shown(text: string): string {
  const escaped = text.replace(/[\u0000-\u001f\u007f\u2028\u2029]/g, (c) =>
    c === '\n' ? '\\n' : c === '\r' ? '\\r' : c === '\t' ? '\\t' : `\\u${c.charCodeAt(0).toString(16).padStart(4, '0')}`,
  );
  return escaped.length > 60 ? `${escaped.slice(0, 57)}…` : escaped;
}
