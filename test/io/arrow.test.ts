import { readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { DiagramSet } from '../../src/core/diagram.js';
import { UserError } from '../../src/core/errors.js';
import { provenance } from '../../src/core/version.js';
import {
  ARROW_KIND_KEY,
  ARROW_PROVENANCE_KEY,
  formatDiagramArrow,
  formatFeatureArrow,
  loadArrowDataset,
  parseArrow,
  readDiagramArrow,
  readFeatureArrow,
  writeDiagramArrow,
  writeFeatureArrow,
} from '../../src/io/arrow.js';
import { readProvenance } from '../../src/io/provenance-file.js';
import { tempDir } from '../helpers/cli.js';

const sets: DiagramSet[] = [
  {
    sample: 'cell-1',
    label: 'intact',
    diagrams: [
      { degree: 1, births: Float64Array.of(0.25), deaths: Float64Array.of(0.75) },
      { degree: 0, births: Float64Array.of(0, 0), deaths: Float64Array.of(0.5, Infinity) },
    ],
  },
  {
    sample: 'cell, "2"',
    label: 'broken strut',
    diagrams: [{ degree: 0, births: Float64Array.of(0), deaths: Float64Array.of(Infinity) }],
  },
  {
    sample: 'zelle-ä',
    label: 'intact',
    diagrams: [{ degree: 0, births: new Float64Array(0), deaths: new Float64Array(0) }],
  },
];

const table = {
  ids: ['a', 'b', 'c'],
  labels: ['healthy', 'cavitating', 'healthy'],
  names: ['H1/L1/t=0.1000', 'H1/L1/t=0.2000'],
  matrix: { rows: 3, cols: 2, data: Float64Array.of(1, 2, 3, 4, 5, 0.1 + 0.2) },
};

describe('Arrow IPC files', () => {
  it('frame the file with the ARROW1 magic at both ends', async () => {
    // Apache Arrow Columnar Format specification, "IPC File Format": the file starts with the magic string
    // ARROW1 plus padding and ends with the footer length followed by ARROW1.
    const bytes = await formatDiagramArrow(sets);
    const magic = Buffer.from('ARROW1');
    expect(Buffer.from(bytes.subarray(0, 6)).equals(magic)).toBe(true);
    expect(Buffer.from(bytes.subarray(bytes.length - 6)).equals(magic)).toBe(true);
  });

  it('diagrams read back equal through apache-arrow’s own reader, with the documented column types', async () => {
    const A = await import('apache-arrow');
    const prov = provenance('diagrams', { degrees: [0, 1] });
    const t = A.tableFromIPC(await formatDiagramArrow(sets, prov));
    expect(t.schema.fields.map((f) => `${f.name}:${String(f.type)}:${f.nullable}`)).toEqual([
      'sample:Utf8:false',
      'label:Utf8:false',
      'degree:Int32:false',
      'birth:Float64:false',
      'death:Float64:false',
    ]);
    expect(t.schema.metadata.get(ARROW_KIND_KEY)).toBe('diagrams');
    expect(JSON.parse(t.schema.metadata.get(ARROW_PROVENANCE_KEY)!)).toEqual(prov);
    // Rows in the diagram CSV order: samples in order, degrees ascending, pairs in stored order.
    expect(t.getChild('sample')!.toArray()).toEqual(['cell-1', 'cell-1', 'cell-1', 'cell, "2"']);
    expect(t.getChild('label')!.toArray()).toEqual(['intact', 'intact', 'intact', 'broken strut']);
    expect([...t.getChild('degree')!.toArray()]).toEqual([0, 0, 1, 0]);
    expect([...t.getChild('birth')!.toArray()]).toEqual([0, 0, 0.25, 0]);
    expect([...t.getChild('death')!.toArray()]).toEqual([0.5, Infinity, 0.75, Infinity]);
  });

  it('diagrams round-trip through our reader (a sample without pairs has no rows, as in the CSV)', async () => {
    const dir = tempDir();
    const file = join(dir, 'd.arrow');
    const prov = provenance('diagrams', { degrees: [0, 1] });
    await writeDiagramArrow(file, sets, prov);
    expect(readProvenance(file)).toEqual(prov);
    const back = await readDiagramArrow(file);
    expect(back.map((s) => s.sample)).toEqual(['cell-1', 'cell, "2"']);
    expect(back[0].diagrams.map((d) => [d.degree, [...d.births], [...d.deaths]])).toEqual([
      [0, [0, 0], [0.5, Infinity]],
      [1, [0.25], [0.75]],
    ]);
    expect(back[1].diagrams.map((d) => [d.degree, [...d.births], [...d.deaths]])).toEqual([
      [0, [0], [Infinity]],
      [1, [], []],
    ]);
    expect(readdirSync(dir).sort()).toEqual(['d.arrow', 'd.arrow.provenance.json']);
  });

  it('diagrams tagged by filtration gain a filtration column and read back with their tags', async () => {
    const tagged: DiagramSet[] = sets.map((set) => ({
      ...set,
      diagrams: set.diagrams.flatMap((d) => [
        { ...d, filtration: 'height:0:1' },
        { ...d, filtration: 'erosion' },
      ]),
    }));
    const bytes = await formatDiagramArrow(tagged);
    const A = await import('apache-arrow');
    const table = A.tableFromIPC(bytes);
    expect(table.schema.fields.map((f) => f.name)).toEqual([
      'sample',
      'label',
      'filtration',
      'degree',
      'birth',
      'death',
    ]);
    const content = await parseArrow(bytes, 't.arrow');
    if (content.kind !== 'diagrams') throw new Error('expected diagrams');
    // Every sample gets every (filtration, degree) channel of the file, filtration-major, empty where it has no pairs.
    expect(content.sets.map((set) => set.sample)).toEqual(['cell-1', 'cell, "2"']);
    for (const [k, set] of content.sets.entries()) {
      expect(set.diagrams.map((d) => `${d.filtration}/H${d.degree}`)).toEqual([
        'height:0:1/H0',
        'height:0:1/H1',
        'erosion/H0',
        'erosion/H1',
      ]);
      for (const d of set.diagrams) {
        const want = tagged[k].diagrams.find((w) => w.filtration === d.filtration && w.degree === d.degree);
        expect(Array.from(d.births)).toEqual(Array.from(want?.births ?? []));
        expect(Array.from(d.deaths)).toEqual(Array.from(want?.deaths ?? []));
      }
    }
  });

  it('feature tables read back equal through apache-arrow’s reader and ours', async () => {
    const A = await import('apache-arrow');
    const t = A.tableFromIPC(await formatFeatureArrow(table));
    expect(t.schema.fields.map((f) => f.name)).toEqual([
      'sample',
      'label',
      'H1/L1/t=0.1000',
      'H1/L1/t=0.2000',
    ]);
    expect(t.schema.metadata.get(ARROW_KIND_KEY)).toBe('table');
    expect([...t.getChild('H1/L1/t=0.2000')!.toArray()]).toEqual([2, 4, 0.1 + 0.2]);
    const dir = tempDir();
    const file = join(dir, 'f.arrow');
    await writeFeatureArrow(file, table, provenance('vectorize', {}));
    const back = await readFeatureArrow(file);
    expect(back.ids).toEqual(table.ids);
    expect(back.labels).toEqual(table.labels);
    expect(back.names).toEqual(table.names);
    expect([...back.matrix.data]).toEqual([...table.matrix.data]);
    await expect(readDiagramArrow(file)).rejects.toThrow(/feature table, not diagrams/);
  });

  it('loads as a diagrams or table dataset for the learning commands', async () => {
    const dir = tempDir();
    await writeDiagramArrow(join(dir, 'd.arrow'), sets, provenance('diagrams', {}));
    const d = await loadArrowDataset(join(dir, 'd.arrow'));
    expect(d.kind).toBe('diagrams');
    expect(d.samples.map((s) => [s.id, s.label])).toEqual([
      ['cell-1', 'intact'],
      ['cell, "2"', 'broken strut'],
    ]);
    await writeFeatureArrow(join(dir, 'f.arrow'), table, provenance('vectorize', {}));
    const t = await loadArrowDataset(join(dir, 'f.arrow'));
    expect(t.kind).toBe('table');
    expect(t.columns).toEqual(table.names);
    expect(t.samples.map((s) => (s.kind === 'table' ? [...s.values] : []))).toEqual([
      [1, 2],
      [3, 4],
      [5, 0.1 + 0.2],
    ]);
  });

  it('writes the same bytes for the same content', async () => {
    const prov = provenance('diagrams', {});
    const a = await formatDiagramArrow(sets, prov);
    const b = await formatDiagramArrow(
      sets.map((s) => ({ ...s })),
      prov,
    );
    expect(Buffer.from(a).equals(Buffer.from(b))).toBe(true);
  });

  it('reads an empty diagrams file', async () => {
    const back = await parseArrow(await formatDiagramArrow([]), 'empty.arrow');
    expect(back.kind).toBe('diagrams');
    if (back.kind === 'diagrams') expect(back.sets).toEqual([]);
  });

  it('gives the one-line user error for a file that is not Arrow', async () => {
    const dir = tempDir();
    const file = join(dir, 'bad.arrow');
    writeFileSync(file, 'sample,label\n');
    await expect(readDiagramArrow(file)).rejects.toBeInstanceOf(UserError);
    await expect(readDiagramArrow(join(dir, 'missing.arrow'))).rejects.toThrow(/file not found/);
    expect(readFileSync(file, 'utf8')).toBe('sample,label\n');
  });
});
