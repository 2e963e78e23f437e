import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

const FAST = ['--models', 'pca-svm', '--depths', '2', '--grid-sizes', '8', '--workers', '1', '--folds', '3'];

describe('landform evaluate', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  writeShapes(input, 6, 20);

  it('writes metrics.json in the contract layout, byte-identical for the same seed', () => {
    const a = runCli([
      'evaluate',
      input,
      ...FAST,
      '--features',
      'landscape,raw',
      '--seed',
      '3',
      '--out',
      join(dir, 'a'),
    ]);
    expect(a.stderr).toBe('');
    expect(a.code).toBe(0);
    expect(a.stdout).toMatch(/^landscape {2}pca-svm {2}accuracy \d\.\d{3} ± \d\.\d{3}/);
    const b = runCli([
      'evaluate',
      input,
      ...FAST,
      '--features',
      'landscape,raw',
      '--seed',
      '3',
      '--out',
      join(dir, 'b'),
      '--quiet',
    ]);
    expect(b.code).toBe(0);
    const ta = readFileSync(join(dir, 'a', 'metrics.json'), 'utf8');
    expect(readFileSync(join(dir, 'b', 'metrics.json'), 'utf8')).toBe(ta);
    const doc = JSON.parse(ta);
    expect(Object.keys(doc)).toEqual([
      'classes',
      'folds',
      'repeats',
      'seed',
      'options',
      'version',
      'results',
    ]);
    expect(doc.classes).toEqual(['disc', 'loop']);
    expect(doc.folds).toBe(3);
    expect(doc.seed).toBe(3);
    expect(doc.results.map((r: { features: string; model: string }) => `${r.features}/${r.model}`)).toEqual([
      'landscape/pca-svm',
      'raw/pca-svm',
    ]);
    const r0 = doc.results[0];
    expect(Object.keys(r0)).toEqual([
      'features',
      'model',
      'accuracy',
      'balancedAccuracy',
      'macroF1',
      'confusion',
      'chosen',
    ]);
    expect(r0.confusion.flat().reduce((s: number, v: number) => s + v, 0)).toBe(12);
    expect(r0.chosen.perFold).toHaveLength(3);
    expect(r0.chosen.mostFrequent.depth).toBe(2);
    expect(r0.accuracy.mean).toBeGreaterThanOrEqual(0);
    expect(r0.accuracy.mean).toBeLessThanOrEqual(1);
  });

  it('refuses a class smaller than the folds in one line and writes nothing', () => {
    const small = join(dir, 'small.csv');
    writeShapes(small, 2, 10);
    const out = join(dir, 'never');
    const r = runCli(['evaluate', small, ...FAST, '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toBe(
      "landform: class 'disc' has 2 samples, fewer than the 3 folds asked for; use --folds 2 or fewer, or add samples of 'disc'\n",
    );
    expect(existsSync(out)).toBe(false);
  });

  it('refuses a single class and an unknown model, one line each', () => {
    const one = join(dir, 'one.csv');
    writeShapes(one, 4, 8, 4, ['disc']);
    const r = runCli(['evaluate', one, ...FAST, '--out', join(dir, 'one')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /^landform: found only one class \('disc'\); classification needs samples of at least two classes/,
    );
    expect(r.stderr.split('\n')).toHaveLength(2);
    const m = runCli(['evaluate', input, '--models', 'boosted', '--out', join(dir, 'm')]);
    expect(m.code).toBe(2);
    expect(m.stderr).toBe("landform: --models 'boosted' is not known; choose from pca-svm, dense, forest\n");
    expect(readdirSync(dir).some((f) => f === 'one' || f === 'm')).toBe(false);
  });
});

describe('landform evaluate: feature budget', () => {
  it('refuses --depths 10000 --grid-sizes 10000 before loading the data, and a matrix over the memory limit', () => {
    const dir = tempDir();
    const input = join(dir, 'shapes.csv');
    writeShapes(input, 3, 10);
    const r = runCli([
      'evaluate',
      input,
      '--depths',
      '10000',
      '--grid-sizes',
      '10000',
      '--out',
      join(dir, 'out'),
    ]);
    // Degrees 0,1 (the default) × 10,000 layers × 10,000 points.
    expect(r.stderr).toBe(
      'landform: --degrees × --depths × --grid-sizes make 200000000 feature columns a sample, above the limit of 200000; use fewer layers or grid points\n',
    );
    expect(r.code).toBe(2);
    expect(existsSync(join(dir, 'out'))).toBe(false);
    // 6 samples × 2 × 100 × 1000 columns × 8 bytes × 4 copies = 38.4 MB, above a 16 MB limit.
    const m = runCli(
      ['evaluate', input, '--depths', '100', '--grid-sizes', '1000', '--out', join(dir, 'm')],
      { env: { LANDFORM_MEMORY_LIMIT: '16M' } },
    );
    expect(m.stderr).toMatch(
      /^landform: a feature matrix of 6 samples × 200000 columns \(4 copies of float64\) needs about 37 MB of memory \(limit 16 MB, set by LANDFORM_MEMORY_LIMIT\)/,
    );
    expect(m.code).toBe(2);
  });
});
