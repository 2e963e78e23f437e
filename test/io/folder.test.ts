import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import type { DistanceSample, ImageSample, PointSample, SignalSample } from '../../src/core/sample.js';
import { distanceFault, readMatrixCsv } from '../../src/io/folder.js';
import { formatPgm, formatPng } from '../../src/io/image-file.js';
import { loadDataset } from '../../src/io/load.js';
import { formatNpy } from '../../src/io/npy.js';
import { formatLabelsCsv } from '../../src/io/sample-writers.js';
import { tempDir } from '../helpers/cli.js';

function folder(files: Record<string, string | Uint8Array>, labels: Array<[string, string]>): string {
  const dir = tempDir();
  for (const [name, data] of Object.entries(files)) writeFileSync(join(dir, name), data);
  writeFileSync(join(dir, 'labels.csv'), formatLabelsCsv(labels.map(([file, label]) => ({ file, label }))));
  return dir;
}

async function userError(promise: Promise<unknown>): Promise<UserError> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof UserError) return error;
    throw error;
  }
  throw new Error('expected a UserError');
}

describe('folder datasets', () => {
  it('reads point clouds from CSV (with or without a header) and .npy, one point being enough', async () => {
    const dir = folder(
      { 'a.csv': 'x,y\n0,0\n1,0\n0,1\n', 'b.csv': '2.5,-1\n', 'c.npy': formatNpy([2, 2], [1, 2, 3, 4]) },
      [
        ['a.csv', 'tri'],
        ['b.csv', 'dot'],
        ['c.npy', 'pair'],
      ],
    );
    const d = await loadDataset(dir);
    expect(d.kind).toBe('points');
    const s = d.samples as PointSample[];
    expect(s.map((x) => [x.id, x.label, x.count, x.dim])).toEqual([
      ['a', 'tri', 3, 2],
      ['b', 'dot', 1, 2],
      ['c', 'pair', 2, 2],
    ]);
    expect(Array.from(s[1].coords)).toEqual([2.5, -1]);
    expect(Array.from(s[2].coords)).toEqual([1, 2, 3, 4]);
  });

  it('detects distance matrices and checks symmetry, zero diagonal and signs within a tolerance', async () => {
    const good = '0,1,2\n1,0,1.5\n2,1.5,0\n';
    const nearly = '0,1,2\n1.0000000000001,0,1.5\n2,1.5,0\n';
    const dir = folder({ 'm1.csv': good, 'm2.npy': formatNpy([2, 2], [0, 3, 3, 0]), 'm3.csv': nearly }, [
      ['m1.csv', 'a'],
      ['m2.npy', 'b'],
      ['m3.csv', 'a'],
    ]);
    const d = await loadDataset(dir);
    expect(d.kind).toBe('distances');
    expect((d.samples as DistanceSample[]).map((s) => s.size)).toEqual([3, 2, 3]);
    const bad = folder({ 'm.csv': '0,1,2\n1,0,1.5\n2,1.6,0\n' }, [['m.csv', 'a']]);
    expect((await loadDataset(bad)).kind).toBe('points');
    const e = await userError(loadDataset(bad, { kind: 'distances' }));
    expect(e.line).toBe(2);
    expect(e.message).toMatch(/not symmetric: entry \(2, 3\) is 1\.5 but \(3, 2\) is 1\.6/);
    expect(distanceFault(2, Float64Array.from([0, -1, -1, 0]))?.message).toMatch(/negative/);
    expect(distanceFault(2, Float64Array.from([0.5, 1, 1, 0]))?.message).toMatch(/diagonal entry 1 is 0\.5/);
    const rect = folder({ 'r.npy': formatNpy([2, 3], [0, 1, 2, 1, 0, 1]) }, [['r.npy', 'a']]);
    expect((await userError(loadDataset(rect, { kind: 'distances' }))).message).toMatch(/must be square/);
  });

  it('says why a folder of square matrices was read as point clouds, once, naming the file and the check', async () => {
    const notes: string[] = [];
    const onNote = (m: string): void => {
      notes.push(m);
    };
    const bad = folder({ 'm.csv': '0,1,2\n1,0,1.5\n2,1.6,0\n', 'n.csv': '0,1,1\n1,0,1\n1,1,0\n' }, [
      ['n.csv', 'a'],
      ['m.csv', 'b'],
    ]);
    expect((await loadDataset(bad, { onNote })).kind).toBe('points');
    expect(notes).toEqual([
      'note: read as point clouds, not distance matrices: m.csv not symmetric: entry (2, 3) is 1.5 but (3, 2) is 1.6 (line 2); give --kind distances to be refused with the reason, or --kind points to silence this',
    ]);
    // One valid matrix beside an array that is not square: the fallback is noted too.
    notes.length = 0;
    const mixed = folder({ 'n.csv': '0,1\n1,0\n', 'r.npy': formatNpy([3, 2], [0, 1, 2, 1, 0, 1]) }, [
      ['n.csv', 'a'],
      ['r.npy', 'b'],
    ]);
    expect((await loadDataset(mixed, { onNote })).kind).toBe('points');
    expect(notes).toHaveLength(1);
    expect(notes[0]).toMatch(/: r\.npy is 3 × 2, not square; give --kind distances/);
    // Clouds that do not look like matrices, or an explicit --kind points: no note.
    notes.length = 0;
    const clouds = folder({ 'a.csv': '0,0\n1,0\n0,1\n', 'b.csv': '1,1\n2,2\n3,1\n' }, [
      ['a.csv', 'a'],
      ['b.csv', 'b'],
    ]);
    await loadDataset(clouds, { onNote });
    await loadDataset(bad, { onNote, kind: 'points' });
    expect(notes).toEqual([]);
  });

  it('reads images: PNG, PGM and .npy frames, and 3-D volumes', async () => {
    const frame = Float64Array.from({ length: 6 }, (_, i) => i * 40);
    const dir = folder(
      {
        'a.png': await formatPng([2, 3], frame),
        'b.pgm': formatPgm([2, 3], frame),
        'c.npy': formatNpy([2, 3], frame),
      },
      [
        ['a.png', 'x'],
        ['b.pgm', 'y'],
        ['c.npy', 'x'],
      ],
    );
    const d = await loadDataset(dir, { kind: 'image' });
    const s = d.samples as ImageSample[];
    expect(s.map((x) => x.shape)).toEqual([
      [2, 3],
      [2, 3],
      [2, 3],
    ]);
    for (const x of s) expect(Array.from(x.values)).toEqual(Array.from(frame));
    const pngOnly = folder({ 'a.png': await formatPng([2, 3], frame) }, [['a.png', 'x']]);
    expect((await loadDataset(pngOnly)).kind).toBe('image');
    const volumes = folder({ 'v.npy': formatNpy([2, 2, 2], [1, 2, 3, 4, 5, 6, 7, 8]) }, [['v.npy', 'x']]);
    const v = await loadDataset(volumes);
    expect(v.kind).toBe('image');
    expect((v.samples[0] as ImageSample).shape).toEqual([2, 2, 2]);
    const mixed = folder(
      { 'a.pgm': formatPgm([2, 3], frame), 'v.npy': formatNpy([2, 2, 2], [1, 2, 3, 4, 5, 6, 7, 8]) },
      [
        ['a.pgm', 'x'],
        ['v.npy', 'y'],
      ],
    );
    expect((await userError(loadDataset(mixed))).message).toMatch(/do not mix images and volumes/);
  });

  it('reads signals from 1-D .npy files and one-column CSV', async () => {
    const dir = folder({ 's.npy': formatNpy([4], [1, 2, 3, 4]), 't.npy': formatNpy([2], [5, 6]) }, [
      ['s.npy', 'a'],
      ['t.npy', 'b'],
    ]);
    const d = await loadDataset(dir);
    expect(d.kind).toBe('signal');
    expect((d.samples as SignalSample[]).map((s) => Array.from(s.values))).toEqual([
      [1, 2, 3, 4],
      [5, 6],
    ]);
    const csv = folder({ 's.csv': 'value\n1\n2\n3\n' }, [['s.csv', 'a']]);
    const one = (await loadDataset(csv, { kind: 'signal' })).samples[0] as SignalSample;
    expect(Array.from(one.values)).toEqual([1, 2, 3]);
  });

  it('refuses ragged and non-numeric per-sample files at the row at fault, and unknown file types', async () => {
    const ragged = folder({ 'a.csv': '0,0\n1\n' }, [['a.csv', 'x']]);
    const e = await userError(loadDataset(ragged));
    expect(e.describe()).toMatch(/a\.csv:2: has 1 fields, the first row has 2/);
    const word = folder({ 'a.csv': '0,0\n1,zero\n' }, [['a.csv', 'x']]);
    expect((await userError(loadDataset(word))).describe()).toMatch(
      /a\.csv:2: 'zero' is not a number in column 2/,
    );
    const other = folder({ 'a.tif': 'II*' }, [['a.tif', 'x']]);
    expect((await userError(loadDataset(other))).describe()).toMatch(
      /labels\.csv:2: 'a\.tif' has an unknown file type '\.tif'/,
    );
    const dims = folder({ 'a.csv': '0,0\n', 'b.csv': '0,0,0\n' }, [
      ['a.csv', 'x'],
      ['b.csv', 'x'],
    ]);
    expect((await userError(loadDataset(dims))).message).toMatch(/has 3 dimensions but a\.csv has 2/);
    const table = folder({ 'a.csv': '0,0\n' }, [['a.csv', 'x']]);
    expect((await userError(loadDataset(table, { kind: 'table' }))).message).toMatch(/not a folder/);
    expect(() => readMatrixCsv(join(table, 'nothing.csv'))).toThrow(/file not found/);
  });

  it('reports progress once per file', async () => {
    const dir = folder({ 'a.csv': '0,0\n', 'b.csv': '1,1\n', 'c.csv': '2,2\n' }, [
      ['a.csv', 'x'],
      ['b.csv', 'x'],
      ['c.csv', 'y'],
    ]);
    const calls: number[][] = [];
    await loadDataset(dir, { onProgress: (done, total) => calls.push([done, total]) });
    expect(calls).toEqual([
      [1, 3],
      [2, 3],
      [3, 3],
    ]);
  });
  it('keeps the error contract under random mutations of labels.csv and of a sample file', async () => {
    // Property testing (Claessen & Hughes, "QuickCheck", 2000): any input gives a dataset or the user error.
    const dir = folder(
      {
        'a.csv': '0,0\n1,0\n0,1\n',
        'b.csv': 'x,y\n2,2\n3,3\n',
        'c.npy': formatNpy([2, 2], [1, 2, 3, 4]),
        'd.pgm': formatPgm([2, 2], [1, 2, 3, 4]),
      },
      [
        ['a.csv', 'tri'],
        ['b.csv', 'pair'],
        ['c.npy', 'pair'],
      ],
    );
    const labels = 'file,label\na.csv,tri\nb.csv,pair\nc.npy,pair\n';
    const pieces = fc.constantFrom(
      ',',
      '"',
      '\n',
      '/',
      '..',
      '../',
      '/etc/passwd',
      'd.pgm',
      'a.csv',
      '\0',
      ' ',
      'C:',
      '\\',
    );
    await fc.assert(
      fc.asyncProperty(
        fc.array(
          fc.record({
            at: fc.nat(),
            cut: fc.integer({ min: 0, max: 4 }),
            text: fc.oneof(pieces, fc.string({ maxLength: 3 })),
          }),
          { minLength: 1, maxLength: 3 },
        ),
        fc.string({ maxLength: 6 }),
        async (edits, junk) => {
          let t = labels;
          for (const e of edits) {
            const at = e.at % (t.length + 1);
            t = t.slice(0, at) + e.text + t.slice(at + e.cut);
          }
          writeFileSync(join(dir, 'labels.csv'), t);
          writeFileSync(join(dir, 'a.csv'), `0,0\n1,${junk}\n`);
          try {
            const d = await loadDataset(dir);
            expect(d.samples.length).toBeGreaterThan(0);
          } catch (error) {
            if (!(error instanceof UserError)) throw error;
            expect(error.describe()).not.toContain('\n');
          }
        },
      ),
      { numRuns: 200, seed: 5 },
    );
  });
});
