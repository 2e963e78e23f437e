import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { provenance } from '../../src/core/version.js';
import {
  columnsSidecarPath,
  formatFeatureCsv,
  readFeatureTable,
  samplesSidecarPath,
  writeFeatureTable,
} from '../../src/io/feature-table.js';
import { loadDataset } from '../../src/io/load.js';
import { parseNpy } from '../../src/io/npy.js';
import { readProvenance } from '../../src/io/provenance-file.js';
import { tempDir } from '../helpers/cli.js';

const table = {
  ids: ['a', 'b,2', 'c'],
  labels: ['ring', 'disc', ''],
  names: ['H1 λ1 t=0.5', 'total'],
  matrix: { rows: 3, cols: 2, data: Float64Array.from([0.1, 1 / 3, -2e-12, 7, 1e300, 0]) },
};

describe('feature tables', () => {
  it('round-trips through CSV, read back as a table dataset with its column names and provenance', async () => {
    const dir = tempDir();
    const path = join(dir, 'features.csv');
    const written = writeFeatureTable(path, table, provenance('vectorize', { grid: 'auto' }, 7), 'csv');
    expect(written).toEqual([path, `${path}.provenance.json`]);
    expect(readFileSync(path, 'utf8').split('\n')[0]).toBe('sample,label,H1 λ1 t=0.5,total');
    const back = await readFeatureTable(path);
    expect(back.ids).toEqual(table.ids);
    expect(back.labels).toEqual(table.labels);
    expect(back.names).toEqual(table.names);
    expect(Array.from(back.matrix.data)).toEqual(Array.from(table.matrix.data));
    expect(readProvenance(path)).toMatchObject({ tool: 'landform', command: 'vectorize', seed: 7 });
    // A table with every id once loads as a table without --kind.
    expect((await loadDataset(path)).kind).toBe('table');
  });

  it('round-trips through NPY with sample and column sidecars that numpy users can read', async () => {
    const dir = tempDir();
    const path = join(dir, 'features.npy');
    const written = writeFeatureTable(path, table, provenance('vectorize', {}), 'npy');
    expect(written).toEqual([
      path,
      join(dir, 'features.samples.csv'),
      join(dir, 'features.columns.csv'),
      `${path}.provenance.json`,
    ]);
    expect(samplesSidecarPath(path)).toBe(join(dir, 'features.samples.csv'));
    expect(columnsSidecarPath(path)).toBe(join(dir, 'features.columns.csv'));
    const array = parseNpy(readFileSync(path), path);
    expect(array.shape).toEqual([3, 2]);
    expect(readFileSync(join(dir, 'features.samples.csv'), 'utf8')).toBe(
      'sample,label\na,ring\n"b,2",disc\nc,\n',
    );
    expect(readFileSync(join(dir, 'features.columns.csv'), 'utf8')).toBe('column\nH1 λ1 t=0.5\ntotal\n');
    const back = await readFeatureTable(path);
    expect(back).toEqual({ ...table, matrix: { ...table.matrix, data: back.matrix.data } });
    expect(Array.from(back.matrix.data)).toEqual(Array.from(table.matrix.data));
    const d = await loadDataset(path);
    expect(d.kind).toBe('table');
    expect(d.columns).toEqual(table.names);
    const signals = await loadDataset(path, { kind: 'signal' });
    expect(signals.samples.map((s) => s.id)).toEqual(table.ids);
  });

  it('refuses an array whose sample list is missing or of the wrong length, naming the fix', async () => {
    const dir = tempDir();
    const path = join(dir, 'x.npy');
    writeFeatureTable(path, table, provenance('vectorize', {}), 'npy');
    writeFileSync(join(dir, 'x.samples.csv'), 'sample,label\na,ring\n');
    await expect(loadDataset(path)).rejects.toThrow(/lists 1 samples but .*x\.npy has 3 rows/);
    writeFileSync(join(dir, 'x.samples.csv'), 'sample,label\na,r\na,r\nb,s\n');
    await expect(loadDataset(path)).rejects.toThrow(/sample 'a' appears twice/);
    const lonely = join(dir, 'lonely.npy');
    writeFileSync(lonely, readFileSync(path));
    await expect(loadDataset(lonely)).rejects.toThrow(
      /no sample list beside it; write .*lonely\.samples\.csv/,
    );
    expect(existsSync(join(dir, 'lonely.samples.csv'))).toBe(false);
  });

  it('refuses inconsistent tables as a programming error', () => {
    expect(() => formatFeatureCsv({ ...table, names: ['one'] })).toThrow(/2 columns but 1 names/);
    expect(() => formatFeatureCsv({ ...table, ids: ['a'] })).toThrow(/3 rows but 1 ids/);
  });
});
