import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import type { DistanceSample, ImageSample, PointSample, SignalSample } from '../../src/core/sample.js';
import { formatSamplesCsv } from '../../src/io/feature-table.js';
import { loadDataset } from '../../src/io/load.js';
import { formatNpy } from '../../src/io/npy.js';
import { tempDir } from '../helpers/cli.js';

function arrayFile(shape: number[], data: number[], ids: string[], labels: string[]): string {
  const dir = tempDir();
  const path = join(dir, 'set.npy');
  writeFileSync(path, formatNpy(shape, data));
  writeFileSync(join(dir, 'set.samples.csv'), formatSamplesCsv(ids, labels));
  return path;
}

describe('whole-dataset .npy arrays', () => {
  it('reads samples × length as signals', async () => {
    const path = arrayFile([2, 3], [1, 2, 3, 4, 5, 6], ['a', 'b'], ['x', 'y']);
    const d = await loadDataset(path);
    expect(d.kind).toBe('signal');
    expect((d.samples as SignalSample[]).map((s) => [s.id, s.label, Array.from(s.values)])).toEqual([
      ['a', 'x', [1, 2, 3]],
      ['b', 'y', [4, 5, 6]],
    ]);
  });

  it('reads samples × h × w as images, and as points or distances when told', async () => {
    const data = [0, 1, 1, 0, 0, 2, 2, 0];
    const path = arrayFile([2, 2, 2], data, ['a', 'b'], ['x', 'y']);
    const images = await loadDataset(path);
    expect(images.kind).toBe('image');
    expect((images.samples[1] as ImageSample).shape).toEqual([2, 2]);
    const points = await loadDataset(path, { kind: 'points' });
    expect(points.samples[0] as PointSample).toMatchObject({ count: 2, dim: 2 });
    const distances = await loadDataset(path, { kind: 'distances' });
    expect(Array.from((distances.samples[1] as DistanceSample).matrix)).toEqual([0, 2, 2, 0]);
    await expect(loadDataset(path, { kind: 'signal' })).rejects.toThrow(/a signal array must be 2-D/);
    await expect(loadDataset(path, { kind: 'diagrams' })).rejects.toThrow(/diagram CSV/);
  });

  it('reads a 4-D array as volumes and refuses a 1-D one', async () => {
    const path = arrayFile([1, 2, 2, 2], [1, 2, 3, 4, 5, 6, 7, 8], ['v'], ['x']);
    expect((await loadDataset(path)).samples[0]).toMatchObject({ kind: 'image', shape: [2, 2, 2] });
    const flat = arrayFile([3], [1, 2, 3], ['a', 'b', 'c'], ['x', 'y', 'z']);
    await expect(loadDataset(flat)).rejects.toThrow(/needs one row per sample/);
  });
});
