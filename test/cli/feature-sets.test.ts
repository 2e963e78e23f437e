import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

// Betti curves, persistence statistics and persistence images with the forest, through the commands
// (plumbing checks on invented demo-style data; their values are checked against definitions in test/features).
describe('feature sets betti, stats, pimage and the forest model through the commands', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  const fresh = join(dir, 'fresh.csv');
  writeShapes(input, 6, 20, 4);
  writeShapes(fresh, 3, 20, 9);

  it('evaluate writes one row per set for the forest and records each vectoriser’s options', () => {
    const r = runCli([
      'evaluate',
      input,
      '--feature-sets',
      'betti,stats,pimage',
      '--models',
      'forest',
      '--folds',
      '3',
      '--workers',
      '1',
      '--seed',
      '2',
      '--quiet',
      '--out',
      join(dir, 'study'),
    ]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    const doc = JSON.parse(readFileSync(join(dir, 'study', 'metrics.json'), 'utf8'));
    expect(doc.results.map((x: { features: string; model: string }) => `${x.features}/${x.model}`)).toEqual([
      'betti/forest',
      'stats/forest',
      'pimage/forest',
    ]);
    for (const row of doc.results) {
      expect(row.accuracy.mean).toBeGreaterThanOrEqual(0);
      expect(row.accuracy.mean).toBeLessThanOrEqual(1);
      expect(row.confusion.flat().reduce((s: number, v: number) => s + v, 0)).toBe(12);
      expect(['1', '5']).toContain(String(row.chosen.mostFrequent.minLeaf));
      expect(row.chosen.mostFrequent.depth).toBeUndefined();
    }
    expect(doc.options.landscapeCandidates).toEqual([]);
    expect(doc.options.betti.gridSize).toBe(50);
    expect(doc.options.stats.degrees).toEqual([0, 1]);
    expect(doc.options.pimage.resolution).toBe(20);
  });

  it('train saves a stats + forest model and predict reloads it for new samples', () => {
    const model = join(dir, 'model');
    const t = runCli([
      'train',
      input,
      '--feature-set',
      'stats',
      '--model',
      'forest',
      '--workers',
      '1',
      '--quiet',
      '--save',
      model,
    ]);
    expect(withoutCompletion(t.stderr)).toBe('');
    expect(t.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(model, 'manifest.json'), 'utf8'));
    expect(manifest.features).toBe('stats');
    expect(manifest.model).toBe('forest');
    expect(manifest.extractor.stats.kind).toBe('landform.persistence-statistics');
    const out = join(dir, 'predictions.csv');
    const p = runCli(['predict', model, fresh, '--workers', '1', '--quiet', '--out', out]);
    expect(p.stderr).toBe('');
    expect(p.code).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('sample,predicted,score:disc,score:loop');
    expect(lines).toHaveLength(7);
    for (const line of lines.slice(1)) {
      const [, predicted, a, b] = line.split(',');
      expect(Number(a) + Number(b)).toBeCloseTo(1, 6);
      expect(['disc', 'loop']).toContain(predicted);
    }
  });

  it('train → predict round trip with persistence images and Betti curves under pca-svm', () => {
    for (const set of ['pimage', 'betti']) {
      const model = join(dir, `model-${set}`);
      const t = runCli(['train', input, '--feature-set', set, '--workers', '1', '--quiet', '--save', model]);
      expect(withoutCompletion(t.stderr)).toBe('');
      expect(t.code).toBe(0);
      const p = runCli(['predict', model, fresh, '--workers', '1', '--quiet']);
      expect(p.stderr).toBe('');
      expect(p.code).toBe(0);
      expect(p.stdout.trim().split('\n')).toHaveLength(7);
    }
  });
});
