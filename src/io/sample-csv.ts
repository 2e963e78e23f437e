import { createReadStream, statSync } from 'node:fs';
import { type Readable, Transform } from 'node:stream';
import { createGunzip } from 'node:zlib';
import { CsvError, parse } from 'csv-parse';
import { UserError } from '../core/errors.js';
import { CSV_OPTIONS, isBlankRecord, isDecimalText, lineBreaksIn, parseNumberField, shown } from './csv.js';
import { Utf8Stream } from './utf8.js';

/**
 * Streams a CSV of the shape `sample,label,<numeric columns>` (the long layout shared by points, signals and
 * feature tables) into one growing Float64Array per sample. Rows of a sample need not be contiguous; samples
 * keep the order of their first row. Nothing holds a JavaScript number per value: memory stays near the numeric
 * payload (8 bytes a value) plus at most the growth slack of each sample's buffer.
 */
export interface SampleRows {
  id: string;
  label: string;
  /** Row-major values, `rows × width`. */
  values: Float64Array;
  rows: number;
  /** The line of this sample's first and of its second row (0 when it has one row). */
  firstLine: number;
  secondLine: number;
}

export interface SampleCsv {
  file: string;
  /** The header as written (trimmed). */
  header: string[];
  /** The numeric column names (header minus `sample,label`). */
  columns: string[];
  samples: SampleRows[];
  /** Data rows read. */
  rowCount: number;
}

export interface SampleCsvOptions {
  /** Called with bytes read so far and the file's size. */
  onProgress?: (done: number, total: number) => void;
}

/** A file's bytes as a stream, through gunzip when the name ends in `.gz` (e.g. `points.csv.gz`). */
export function openText(file: string, raw = createReadStream(file, { highWaterMark: 1 << 16 })): Readable {
  if (!/\.gz$/i.test(file)) return raw;
  const gunzip = createGunzip({ chunkSize: 1 << 16 });
  raw.on('error', (error) => gunzip.destroy(error));
  // Closing the decompressor early (after the header, or on an error) closes the file too.
  gunzip.on('close', () => raw.destroy());
  return raw.pipe(gunzip);
}

/** Reads only the header line of a CSV (for kind detection), without reading the whole file. */
export async function readCsvHeader(file: string): Promise<{ fields: string[]; line: number } | undefined> {
  const source = openText(file);
  const parser = source.pipe(parse({ ...CSV_OPTIONS, to_line: 256 }));
  source.on('error', (error) => parser.destroy(error));
  let line = 1;
  try {
    for await (const fields of parser as AsyncIterable<string[]>) {
      const at = line;
      line += 1 + lineBreaksIn(fields);
      if (!isBlankRecord(fields)) return { fields, line: at };
    }
  } catch (error) {
    throw csvSyntaxError(error, file);
  } finally {
    parser.destroy();
    source.destroy();
  }
  return undefined;
}

export function csvSyntaxError(error: unknown, file: string): UserError {
  if (error instanceof UserError) return error;
  const e = error as { lines?: number; message?: string; code?: string };
  if (e.code === 'ENOENT') return new UserError('file not found; check the path', { file });
  if (e.code === 'Z_DATA_ERROR' || e.code === 'Z_BUF_ERROR' || e.code === 'Z_NEED_DICT') {
    return new UserError(
      'not a readable gzip file (damaged or cut short); compress it again or give the plain CSV',
      {
        file,
      },
    );
  }
  if (e.code === 'EISDIR') return new UserError('is a folder, not a file; give a file', { file });
  if (error instanceof CsvError || (typeof e.code === 'string' && e.code.startsWith('CSV_'))) {
    return new UserError(
      `not valid CSV (${String(e.message ?? error).split('\n')[0]}); fix the quoting or the row`,
      {
        file,
        line: e.lines,
      },
    );
  }
  return error as UserError;
}

const EMPTY = new Float64Array(0);

/** Largest chunk of a sample's buffer, in values (512 KB). */
const MAX_CHUNK = 1 << 16;

/**
 * A sample's values while reading: a list of full chunks plus the chunk being filled. Chunks never move once
 * written (no copy-on-grow garbage); each new chunk is as large as everything before it, up to MAX_CHUNK, so
 * the unused tail is at most one chunk.
 */
interface Building {
  chunks: Float64Array[];
  current: Float64Array;
  fill: number;
  total: number;
}

function gather(b: Building): Float64Array {
  if (b.chunks.length === 0 && b.fill === b.current.length) return b.current;
  const out = new Float64Array(b.total);
  let at = 0;
  for (const c of b.chunks) {
    out.set(c, at);
    at += c.length;
  }
  out.set(b.current.subarray(0, b.fill), at);
  return out;
}

/**
 * Streams `file` (header `sample,label,c1,…,ck`, k ≥ 1) into per-sample buffers.
 *
 * Files without a double quote anywhere (numeric tables almost always) are split by a plain reader: lines at
 * CRLF, LF or CR, fields at commas, trimmed of spaces, tabs and form feeds — the records csv-parse gives with
 * CSV_OPTIONS for such text, about 5× faster. At the first chunk holding a quote the plain reading stops and
 * the file is read again by csv-parse, which owns quoting and its errors; gzip files always go to csv-parse.
 */
export async function readSampleCsv(file: string, options: SampleCsvOptions = {}): Promise<SampleCsv> {
  if (!/\.gz$/i.test(file)) {
    const plain = await collectSamples(file, options, plainRecords);
    if (plain !== undefined) return plain;
  }
  return (await collectSamples(file, options, parsedRecords)) as SampleCsv;
}

/**
 * Calls `take` with each record of `file` and the line it starts on (blank lines included); resolves false
 * when it gives the file up unread (then nothing more is taken).
 */
type RecordSource = (
  file: string,
  options: SampleCsvOptions,
  take: (fields: string[], line: number) => void,
) => Promise<boolean>;

/** A read stream of `file`, reporting progress as options ask. */
function progressStream(file: string, options: SampleCsvOptions): ReturnType<typeof createReadStream> {
  const total = statSync(file).size;
  // 64 KB reads: each chunk becomes at most a few thousand records at once, which keeps the parser's garbage
  // small (1 MB reads made bursts of ~25,000 records and raised peak memory by tens of MB; measured).
  const stream = createReadStream(file, { highWaterMark: 1 << 16 });
  let bytes = 0;
  let lastReport = 0;
  if (options.onProgress) {
    const report = options.onProgress;
    stream.on('data', (chunk) => {
      bytes += chunk.length;
      if (bytes - lastReport >= 1 << 22 || bytes === total) {
        lastReport = bytes;
        report(bytes, total);
      }
    });
  }
  return stream;
}

/** The records of a file without quotes (see readSampleCsv); false at the first chunk with a quote. */
export const plainRecords: RecordSource = async (file, options, take) => {
  const stream = progressStream(file, options);
  const decoder = new Utf8Stream(file);
  let carry = '';
  let line = 1;
  let started = false;
  try {
    for await (const chunk of stream as AsyncIterable<Buffer>) {
      if (chunk.indexOf(QUOTE) >= 0) return false;
      // The chunk starts on the line after the last one taken plus those in the unfinished rest (a CR at most).
      let text = carry + decoder.decode(chunk, line + (carry.endsWith('\r') && chunk[0] !== 10 ? 1 : 0));
      if (!started && text.length > 0) {
        started = true;
        if (text.charCodeAt(0) === BOM) text = text.slice(1);
      }
      const end = splitLines(text, line, false, take);
      line = end.line;
      carry = text.slice(end.rest);
    }
    let text = carry + decoder.end(line);
    if (!started && text.charCodeAt(0) === BOM) text = text.slice(1);
    splitLines(text, line, true, take);
  } catch (error) {
    throw csvSyntaxError(error, file);
  } finally {
    stream.destroy();
  }
  return true;
};

const QUOTE = 0x22;
const BOM = 0xfeff;

/**
 * Takes every complete line of `text` as a record, from line number `line` on; returns the next line number
 * and where the unfinished rest starts. A CR at the very end waits for the next chunk (it may begin a CRLF),
 * unless this is the last text; there, a last line without a line break is taken too (unless blank).
 */
function splitLines(
  text: string,
  line: number,
  last: boolean,
  take: (fields: string[], line: number) => void,
): { line: number; rest: number } {
  let start = 0;
  let lf = text.indexOf('\n');
  let cr = text.indexOf('\r');
  // invariant: text[0 … start) is taken, and lf / cr are the first of their kind at or after start (or −1)
  while (true) {
    if (lf >= 0 && lf < start) lf = text.indexOf('\n', start);
    if (cr >= 0 && cr < start) cr = text.indexOf('\r', start);
    const brk = lf < 0 ? cr : cr < 0 ? lf : Math.min(lf, cr);
    if (brk < 0) break;
    if (brk === cr && brk === text.length - 1 && !last) break;
    take(splitFields(text.slice(start, brk)), line++);
    start = brk === cr && text.charCodeAt(brk + 1) === 10 ? brk + 2 : brk + 1;
  }
  if (last && start < text.length) {
    // A last line without a break that is blank makes no record (as in csv-parse).
    const fields = splitFields(text.slice(start));
    if (fields.length > 1 || fields[0] !== '') take(fields, line++);
    start = text.length;
  }
  return { line, rest: start };
}

/** One unquoted line's fields, each trimmed as csv-parse's `trim` does (spaces, tabs, form feeds). */
function splitFields(text: string): string[] {
  const fields = text.split(',');
  for (let i = 0; i < fields.length; i++) fields[i] = trimField(fields[i]);
  return fields;
}

function trimField(field: string): string {
  let from = 0;
  let to = field.length;
  while (from < to && isTrimmed(field.charCodeAt(from))) from++;
  while (to > from && isTrimmed(field.charCodeAt(to - 1))) to--;
  return from === 0 && to === field.length ? field : field.slice(from, to);
}

function isTrimmed(c: number): boolean {
  return c === 32 || c === 9 || c === 12;
}

/** The records of any CSV, by csv-parse (quoted fields, quoted line breaks, its syntax errors). */
const parsedRecords: RecordSource = async (file, options, take) => {
  const stream = progressStream(file, options);
  // No `info` records: they cost about half of csv-parse's time (measured) and their line counts are off
  // after blank lines; lines are counted from the records instead (see CSV_OPTIONS).
  const source = openText(file, stream);
  const checked = source.pipe(utf8Check(file));
  const parser = checked.pipe(parse(CSV_OPTIONS));
  let nextLine = 1;
  await new Promise<void>((resolve, reject) => {
    let failed = false;
    const fail = (error: unknown): void => {
      if (failed) return;
      failed = true;
      stream.destroy();
      source.destroy();
      checked.destroy();
      parser.destroy();
      reject(csvSyntaxError(error, file));
    };
    stream.on('error', fail);
    source.on('error', fail);
    checked.on('error', fail);
    parser.on('error', fail);
    parser.on('readable', () => {
      try {
        while (!failed) {
          const fields = parser.read() as string[] | null;
          if (fields === null) break;
          const line = nextLine;
          nextLine += 1 + lineBreaksIn(fields);
          take(fields, line);
        }
      } catch (error) {
        fail(error);
      }
    });
    parser.on('end', () => {
      if (!failed) resolve();
    });
  });
  return true;
};

/** Passes bytes through unchanged, failing at the first byte that is not UTF-8 with its line (utf8.ts). */
function utf8Check(file: string): Transform {
  const decoder = new Utf8Stream(file);
  return new Transform({
    transform(chunk: Buffer, _encoding, done) {
      try {
        decoder.decode(chunk);
        done(null, chunk);
      } catch (error) {
        done(error as Error);
      }
    },
    flush(done) {
      try {
        decoder.end();
        done();
      } catch (error) {
        done(error as Error);
      }
    },
  });
}

/** The samples of `file`, its records read by `source`; undefined when the source gave the file up. */
async function collectSamples(
  file: string,
  options: SampleCsvOptions,
  source: RecordSource,
): Promise<SampleCsv | undefined> {
  let header: string[] | undefined;
  let headerLine = 0;
  let width = 0;
  const index = new Map<string, number>();
  const samples: SampleRows[] = [];
  const building: Building[] = [];
  let rowCount = 0;

  const take = (record: string[], line: number): void => {
    if (header === undefined) {
      header = record;
      headerLine = line;
      checkHeader(header, file, line);
      width = header.length - 2;
      return;
    }
    if (record.length !== header.length) {
      throw new UserError(
        `has ${record.length} fields, the header has ${header.length}; every row needs sample, label and ${width} value${width === 1 ? '' : 's'}`,
        { file, line },
      );
    }
    const id = record[0];
    if (id === '')
      throw new UserError('empty sample id; every row needs one in column sample', { file, line });
    const label = record[1];
    let k = index.get(id);
    let s: SampleRows;
    if (k === undefined) {
      k = samples.length;
      index.set(id, k);
      s = { id, label, values: EMPTY, rows: 0, firstLine: line, secondLine: 0 };
      samples.push(s);
      building.push({ chunks: [], current: new Float64Array(width), fill: 0, total: 0 });
    } else {
      s = samples[k];
      if (s.label !== label) {
        throw new UserError(
          `sample '${shown(id)}' has label '${shown(label)}' here but '${shown(s.label)}' on line ${s.firstLine}; give each sample one label`,
          { file, line },
        );
      }
      if (s.rows === 1) s.secondLine = line;
    }
    const b = building[k];
    if (b.fill + width > b.current.length) {
      if (b.fill > 0) b.chunks.push(b.fill === b.current.length ? b.current : b.current.slice(0, b.fill));
      b.current = new Float64Array(
        Math.max(width, Math.min(MAX_CHUNK - (MAX_CHUNK % width), b.total + b.fill)),
      );
      b.total += b.fill;
      b.fill = 0;
    }
    const chunk = b.current;
    let fill = b.fill;
    // Invariant: chunk[0 .. fill) holds this chunk's earlier values; each field fills the next slot.
    for (let c = 2; c < record.length; c++) {
      const text = record[c];
      const v = Number(text);
      if (!Number.isFinite(v) || !isDecimalText(text)) {
        parseNumberField(text, { file, line, column: header[c] });
        throw new UserError(`'${shown(text)}' is not a number in column ${shown(header[c])}`, { file, line });
      }
      chunk[fill++] = v;
    }
    b.fill = fill;
    s.rows++;
    rowCount++;
  };

  const read = await source(file, options, (fields, line) => {
    if (!isBlankRecord(fields)) take(fields, line);
  });
  if (!read) return undefined;

  if (header === undefined) {
    throw new UserError('empty file; expected a header such as sample,label,x,y and one row per value', {
      file,
    });
  }
  if (rowCount === 0) {
    throw new UserError('header only, no rows; add at least one sample', { file, line: headerLine });
  }
  // One sample at a time, so the peak stays near the payload plus one sample.
  for (let k = 0; k < samples.length; k++) {
    const b = building[k];
    b.total += b.fill;
    samples[k].values = gather(b);
    building[k] = { chunks: [], current: EMPTY, fill: 0, total: 0 };
  }
  return { file, header, columns: header.slice(2), samples, rowCount };
}

function checkHeader(header: string[], file: string, line: number): void {
  const lower = header.map((h) => h.toLowerCase());
  if (lower[0] !== 'sample' || lower[1] !== 'label') {
    throw new UserError(
      `the header must start with sample,label (got '${shown(header.slice(0, 2).join(','))}'); name the first two columns sample and label`,
      { file, line },
    );
  }
  if (header.length < 3) {
    throw new UserError('no value columns after sample,label; add at least one numeric column', {
      file,
      line,
    });
  }
  const seen = new Set<string>();
  for (let c = 2; c < header.length; c++) {
    if (header[c] === '')
      throw new UserError(`column ${c + 1} has no name; name every column`, { file, line });
    if (seen.has(lower[c]))
      throw new UserError(`column '${shown(header[c])}' appears twice; give columns distinct names`, {
        file,
        line,
      });
    seen.add(lower[c]);
  }
}
