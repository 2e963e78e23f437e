import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { parse } from 'csv-parse/sync';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import type { Dataset } from '../../src/core/sample.js';
import { CSV_OPTIONS, lineBreaksIn } from '../../src/io/csv.js';
import { parsePgm } from '../../src/io/image-file.js';
import { loadDataset } from '../../src/io/load.js';
import { formatNpy, parseNpy } from '../../src/io/npy.js';
import { plainRecords, readCsvHeader, readSampleCsv } from '../../src/io/sample-csv.js';
import { tempDir } from '../helpers/cli.js';

const VALID = [
  'sample,label,x,y\na,ring,0,0\na,ring,1,0.5\nb,disc,2,-1\n"c,1",,3e-2,4\nb,disc,1,1\n',
  'sample,label,value\ns1,healthy,0.1\ns1,healthy,0.2\ns2,worn,1\n',
  'sample,label,degree,birth,death\na,x,0,0,inf\na,x,1,0.2,0.5\nb,y,0,0,inf\n',
  'sample,label,f1,f2,f3\nu,p,1,2,3\nv,q,4,5,6\n',
];

/** One random edit of a text: delete, insert, replace or duplicate a slice; a few characters CSV cares about. */
const edit = fc.record({
  op: fc.constantFrom('delete', 'insert', 'replace', 'duplicate-line', 'truncate'),
  at: fc.nat(),
  length: fc.integer({ min: 1, max: 6 }),
  text: fc.oneof(
    fc.constantFrom(
      ',',
      '"',
      '\n',
      '\r\n',
      ' ',
      'inf',
      'NaN',
      '-',
      'e',
      '1e999',
      '\uFEFF',
      '\0',
      'sample',
      '#',
      '\t',
      ',,',
    ),
    fc.string({ maxLength: 4 }),
  ),
});

function mutate(
  text: string,
  edits: Array<{ op: string; at: number; length: number; text: string }>,
): string {
  let t = text;
  for (const e of edits) {
    const at = t.length === 0 ? 0 : e.at % (t.length + 1);
    if (e.op === 'delete') t = t.slice(0, at) + t.slice(at + e.length);
    else if (e.op === 'insert') t = t.slice(0, at) + e.text + t.slice(at);
    else if (e.op === 'replace') t = t.slice(0, at) + e.text + t.slice(at + e.length);
    else if (e.op === 'truncate') t = t.slice(0, at);
    else {
      const lines = t.split('\n');
      const k = at % Math.max(1, lines.length);
      lines.splice(k, 0, lines[k] ?? '');
      t = lines.join('\n');
    }
  }
  return t;
}

function checkDataset(d: Dataset): void {
  expect(d.samples.length).toBeGreaterThan(0);
  const ids = new Set<string>();
  for (const s of d.samples) {
    expect(s.kind).toBe(d.kind);
    expect(s.id).not.toBe('');
    expect(ids.has(s.id)).toBe(false);
    ids.add(s.id);
    if (s.kind === 'points') {
      expect(s.coords.length).toBe(s.count * s.dim);
      expect(s.count).toBeGreaterThan(0);
      for (const v of s.coords) expect(Number.isFinite(v)).toBe(true);
    } else if (s.kind === 'signal' || s.kind === 'table') {
      for (const v of s.values) expect(Number.isFinite(v)).toBe(true);
    } else if (s.kind === 'diagrams') {
      for (const g of s.diagrams)
        for (let i = 0; i < g.births.length; i++) expect(g.deaths[i]).toBeGreaterThanOrEqual(g.births[i]);
    }
  }
}

function checkUserError(error: unknown, file: string): void {
  if (!(error instanceof UserError)) throw error;
  const line = error.describe();
  expect(line.includes('\n')).toBe(false);
  expect(line.startsWith(file)).toBe(true);
  if (error.line !== undefined) expect(Number.isInteger(error.line) && error.line >= 1).toBe(true);
}

describe('the CSV reader under random mutations of valid files', () => {
  it('gives a valid dataset or the one-line user error, never another exception', async () => {
    // Property testing with fast-check: Claessen & Hughes, "QuickCheck: a lightweight tool for random testing
    // of Haskell programs", 2000 — here the property is the error contract of the loader.
    const dir = tempDir();
    let n = 0;
    let valid = 0;
    let refused = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(...VALID),
        fc.array(edit, { minLength: 1, maxLength: 4 }),
        async (base, edits) => {
          const file = join(dir, `m${n++}.csv`);
          writeFileSync(file, mutate(base, edits));
          try {
            checkDataset(await loadDataset(file));
            valid++;
          } catch (error) {
            checkUserError(error, file);
            refused++;
          }
        },
      ),
      { numRuns: 300, seed: 20261202 },
    );
    // Both outcomes occur, so the property is not vacuous.
    expect(valid).toBeGreaterThan(10);
    expect(refused).toBeGreaterThan(10);
  });

  it('keeps the contract when a kind is forced', async () => {
    const dir = tempDir();
    let n = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.constantFrom(...VALID),
        fc.array(edit, { maxLength: 2 }),
        fc.constantFrom(
          'points',
          'signal',
          'table',
          'diagrams',
          'image',
          'distances',
        ) as fc.Arbitrary<'points'>,
        async (base, edits, kind) => {
          const file = join(dir, `k${n++}.csv`);
          writeFileSync(file, mutate(base, edits));
          try {
            checkDataset(await loadDataset(file, { kind }));
          } catch (error) {
            checkUserError(error, file);
          }
        },
      ),
      { numRuns: 150, seed: 7 },
    );
  });

  it('numbers rows by the line they start on, across blank lines, CRLF and quoted line breaks', async () => {
    // Source: RFC 4180, "Common Format and MIME Type for Comma-Separated Values (CSV) Files", 2005, section 2:
    // a quoted field may hold line breaks and doubled quotes. Lines are counted as a text editor shows them,
    // so a row that spans lines is reported at its first line.
    const dir = tempDir();
    const file = join(dir, 'lines.csv');
    writeFileSync(file, '\n\nsample,label,x\r\n\r\n"a","r\r\nq""",1\r\n   \nb,s,2\n\n\nb,s,3\n');
    expect(await readCsvHeader(file)).toEqual({ fields: ['sample', 'label', 'x'], line: 3 });
    const csv = await readSampleCsv(file);
    expect(csv.samples.map((s) => [s.id, s.label, s.firstLine, s.secondLine])).toEqual([
      ['a', 'r\r\nq"', 5, 0],
      ['b', 's', 8, 11],
    ]);
    writeFileSync(file, 'sample,label,x\r\n\r\n"a","r\r\nq""",1\r\n   \nb,s,2\n\n\nb,s,oops\n');
    await expect(readSampleCsv(file)).rejects.toMatchObject({ line: 9 });
  });

  it('counts lines like a text editor on quote-free files (oracle: split on line breaks)', async () => {
    const dir = tempDir();
    let n = 0;
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.constantFrom('', '  ', 'a,r,1', 'b,s,2', 'c,r,3', 'a,r,4'), {
          minLength: 1,
          maxLength: 12,
        }),
        fc.constantFrom('\n', '\r\n'),
        async (rows, eol) => {
          const file = join(dir, `o${n++}.csv`);
          const lines = ['sample,label,x', ...rows];
          writeFileSync(file, lines.join(eol) + eol);
          if (rows.every((r) => r.trim() === '')) return;
          const csv = await readSampleCsv(file);
          for (const s of csv.samples)
            expect(s.firstLine).toBe(lines.findIndex((l) => l.startsWith(`${s.id},`)) + 1);
        },
      ),
      { numRuns: 100, seed: 11 },
    );
  });

  it('reads only the header line for detection and streams the rows', async () => {
    const dir = tempDir();
    const file = join(dir, 'h.csv');
    writeFileSync(file, VALID[0]);
    expect(await readCsvHeader(file)).toEqual({ fields: ['sample', 'label', 'x', 'y'], line: 1 });
    const csv = await readSampleCsv(file);
    expect(csv.rowCount).toBe(5);
    expect(csv.samples.map((s) => [s.id, s.rows, s.firstLine, s.secondLine])).toEqual([
      ['a', 2, 2, 3],
      ['b', 2, 4, 6],
      ['c,1', 1, 5, 0],
    ]);
    // Buffers are trimmed to the rows read.
    expect(csv.samples[0].values.length).toBe(4);
  });
});

// The plain reader (files without quotes) must give the records csv-parse gives with the same options: the
// reference is the general-purpose parser csv-parse (Adaltas, csv-parse 6, npm), run on the same text.
describe('the plain reader of quote-free CSV files', () => {
  /** csv-parse's records of `text`, each with the line it starts on (counted as readSampleCsv does). */
  function reference(text: string): Array<[string[], number]> {
    const out: Array<[string[], number]> = [];
    let line = 1;
    for (const fields of parse(text, CSV_OPTIONS) as string[][]) {
      out.push([fields, line]);
      line += 1 + lineBreaksIn(fields);
    }
    return out;
  }

  async function plain(file: string): Promise<Array<[string[], number]> | false> {
    const out: Array<[string[], number]> = [];
    const read = await plainRecords(file, {}, (fields, line) => out.push([fields, line]));
    return read ? out : false;
  }

  it('splits like csv-parse: three line endings, blank lines, a BOM, padded fields, no final break', async () => {
    const dir = tempDir();
    let n = 0;
    const piece = fc.constantFrom(
      'a',
      'b1',
      '2.5',
      '-3e-2',
      ' x ',
      '\tt\t',
      '\f',
      '  ',
      'é',
      '測',
      '🙂',
      '',
      'inf',
    );
    const row = fc.array(piece, { minLength: 1, maxLength: 5 }).map((fields) => fields.join(','));
    await fc.assert(
      fc.asyncProperty(
        fc.array(fc.tuple(row, fc.constantFrom('\n', '\r\n', '\r')), { minLength: 1, maxLength: 20 }),
        fc.boolean(),
        fc.boolean(),
        async (lines, bom, finalBreak) => {
          let text = (bom ? '\uFEFF' : '') + lines.map(([r, eol]) => r + eol).join('');
          if (!finalBreak) text = text.replace(/(\r\n|\n|\r)$/, '');
          const file = join(dir, `p${n++}.csv`);
          writeFileSync(file, text);
          expect(await plain(file)).toEqual(reference(text));
        },
      ),
      { numRuns: 300, seed: 23 },
    );
  });

  it('keeps a CRLF and a multi-byte character whole across 64 KB reads', async () => {
    const dir = tempDir();
    const rows: string[] = ['sample,label,x'];
    let bytes = rows[0].length + 2;
    // Rows up to just before the first read boundary (65,536 bytes), then one whose CR is its last byte.
    while (bytes < 65536 - 40) {
      const r = `s${rows.length % 7},ok,${rows.length}`;
      rows.push(r);
      bytes += r.length + 2;
    }
    rows.push(`t,${'y'.repeat(65536 - bytes - 5)},1`);
    let text = `${rows.join('\r\n')}\r\n`;
    expect(text.indexOf('\r', 65535 - 2)).toBe(65535);
    // And a 4-byte character split by the second boundary.
    const pad = 2 * 65536 - 2 - Buffer.byteLength(text) - 'u,'.length;
    text += `u,${'z'.repeat(pad)}🙂,2\r\nv,w,3`;
    expect(Buffer.byteLength(text.slice(0, text.indexOf('🙂')))).toBeLessThan(2 * 65536);
    expect(Buffer.byteLength(text.slice(0, text.indexOf('🙂') + 2))).toBeGreaterThan(2 * 65536);
    const file = join(dir, 'edges.csv');
    writeFileSync(file, text);
    expect(await plain(file)).toEqual(reference(text));
  });

  it('gives a file with a quote to csv-parse, with the same samples as the plain reading', async () => {
    const dir = tempDir();
    const plainFile = join(dir, 'plain.csv');
    const quotedFile = join(dir, 'quoted.csv');
    const lines = ['sample,label,x,y'];
    const eols = ['\n', '\r\n', '\r'];
    for (let k = 0; k < 20000; k++) lines.push(`c${k % 97}, l${k % 97} ,${(k * 0.37) % 5},${-k / 3}`);
    let text = '';
    for (let k = 0; k < lines.length; k++) text += lines[k] + eols[k % 3] + (k % 1000 === 999 ? '\n' : '');
    writeFileSync(plainFile, text);
    writeFileSync(quotedFile, `"sample"${text.slice('sample'.length)}`);
    expect(await plain(plainFile)).not.toBe(false);
    expect(await plain(quotedFile)).toBe(false);
    const a = await readSampleCsv(plainFile);
    const b = await readSampleCsv(quotedFile);
    expect({ ...a, file: '' }).toEqual({ ...b, file: '' });
    expect(a.rowCount).toBe(20000);
    expect(a.samples[1].label).toBe('l1');
  });
});

describe('binary readers under random bytes', () => {
  it('NPY and PGM parsers refuse garbage with the user error only', () => {
    const good = formatNpy([2, 2], [1, 2, 3, 4]);
    fc.assert(
      fc.property(
        fc.array(fc.record({ at: fc.nat(), value: fc.integer({ min: 0, max: 255 }) }), { maxLength: 8 }),
        fc.nat(),
        (flips, cut) => {
          const bytes = Uint8Array.from(good);
          for (const f of flips) bytes[f.at % bytes.length] = f.value;
          const sliced = bytes.subarray(0, cut % (bytes.length + 1));
          for (const parse of [() => parseNpy(sliced, 'x.npy'), () => parsePgm(sliced, 'x.pgm')]) {
            try {
              parse();
            } catch (error) {
              if (!(error instanceof UserError)) throw error;
            }
          }
        },
      ),
      { numRuns: 400, seed: 3 },
    );
  });
});
