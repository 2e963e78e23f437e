import { existsSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

describe('landform train', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  writeShapes(input, 5, 20);

  it('saves a model folder whose manifest holds the options, learned grid, classes and checksum', () => {
    const save = join(dir, 'models', 'rings');
    const r = runCli([
      'train',
      input,
      '--depths',
      '2,3',
      '--grid-sizes',
      '8',
      '--workers',
      '1',
      '--save',
      save,
    ]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    expect(r.stdout).toMatch(
      /^trained landscape \+ pca-svm on 10 samples \(2 classes\); chosen depth=[23] gridSize=8 /,
    );
    const manifest = JSON.parse(readFileSync(join(save, 'manifest.json'), 'utf8'));
    expect(manifest.classes).toEqual(['disc', 'loop']);
    expect(manifest.features).toBe('landscape');
    expect(typeof manifest.checksum).toBe('string');
    expect(manifest.record.diagramOptions).toEqual({ degrees: [0, 1], metric: 'euclidean' });
    const grids = manifest.extractor.landscape.state.grids;
    expect(grids.map((g: { degree: number }) => g.degree)).toEqual([0, 1]);
    expect(grids[0].grid.count).toBe(8);
    expect(grids[0].grid.stop).toBeGreaterThan(grids[0].grid.start);
    expect(existsSync(join(save, 'classifier.json'))).toBe(true);
  });

  it('fixes the SVM kernel, C and PCA variance, and records them in the manifest', () => {
    const save = join(dir, 'models', 'fixed');
    const r = runCli([
      'train',
      input,
      '--depths',
      '2',
      '--grid-sizes',
      '8',
      '--workers',
      '1',
      '--svm-kernel',
      'linear',
      '--svm-c',
      '3',
      '--pca-variance',
      'all',
      '--progress',
      'lines',
      '--save',
      save,
    ]);
    expect(r.code).toBe(0);
    // --progress lines, in a pipe: every value is fixed, so no inner search runs; the phases say so.
    expect(r.stderr.split('\n').map((l) => l.replace(/, .*$/, ''))).toEqual([
      'landform: diagrams 0/10 (0%)',
      'landform: diagrams 10/10 (100%)',
      'landform: final fit 0/1 (0%)',
      'landform: final fit 1/1 (100%)',
      `landform train: wrote ${save} (model folder of landscape + pca-svm`,
      '',
    ]);
    expect(r.stdout).toMatch(/chosen depth=2 gridSize=8 C=3 kernel=linear varianceKept=1\n/);
    const manifest = JSON.parse(readFileSync(join(save, 'manifest.json'), 'utf8'));
    expect(manifest.record.modelOptions).toEqual({
      'pca-svm': { kernel: 'linear', C: 3, gamma: null, pcaVariance: 'all' },
    });
  });

  it('refuses two models at once and a missing --save, one line each', () => {
    const a = runCli(['train', input, '--model', 'pca-svm,dense', '--save', join(dir, 'x')]);
    expect(a.code).toBe(2);
    expect(a.stderr).toBe(
      "landform: --model takes one value here, got 'pca-svm,dense'; pick one (evaluate compares several)\n",
    );
    const b = runCli(['train', input]);
    expect(b.code).toBe(2);
    expect(b.stderr).toBe(
      'landform: no --save DIR given; name the model folder to write, e.g. models/NAME\n',
    );
  });
});

describe('landform train: feature budget', () => {
  it('refuses --depths 10000 --grid-sizes 10000 in one line', () => {
    const dir = tempDir();
    const input = join(dir, 'shapes.csv');
    writeShapes(input, 3, 10);
    const r = runCli([
      'train',
      input,
      '--depths',
      '10000',
      '--grid-sizes',
      '10000',
      '--save',
      join(dir, 'model'),
    ]);
    expect(r.stderr).toMatch(
      /^landform: --degrees × --depths × --grid-sizes make 200000000 feature columns a sample, above the limit of 200000/,
    );
    expect(r.code).toBe(2);
    expect(existsSync(join(dir, 'model'))).toBe(false);
  });
});
