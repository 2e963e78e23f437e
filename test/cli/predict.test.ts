import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

describe('landform predict', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  const fresh = join(dir, 'fresh.csv');
  writeShapes(input, 5, 20, 4);
  writeShapes(fresh, 3, 20, 9);
  const model = join(dir, 'model');
  const trained = runCli([
    'train',
    input,
    '--depths',
    '2',
    '--grid-sizes',
    '8',
    '--workers',
    '1',
    '--save',
    model,
  ]);

  it('writes sample,predicted and one score column per class for new samples', () => {
    expect(trained.code).toBe(0);
    const out = join(dir, 'predictions.csv');
    const r = runCli(['predict', model, fresh, '--workers', '1', '--out', out]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    expect(lines[0]).toBe('sample,predicted,score:disc,score:loop');
    expect(lines).toHaveLength(7);
    let correct = 0;
    for (const line of lines.slice(1)) {
      const [sample, predicted, a, b] = line.split(',');
      expect(Number(a) + Number(b)).toBeCloseTo(1, 6);
      expect(['disc', 'loop']).toContain(predicted);
      if (sample.startsWith(predicted)) correct++;
    }
    // Discs against circles: the H1 landscape tells them apart (demo data; a plumbing check, not a benchmark).
    expect(correct).toBeGreaterThanOrEqual(5);
  });

  it('refuses an altered model folder and a model of another kind in one line', () => {
    const path = join(model, 'classifier.json');
    const original = readFileSync(path, 'utf8');
    writeFileSync(path, original.replace('"pca-svm"', '"pca-svm" '));
    const r = runCli(['predict', model, fresh]);
    writeFileSync(path, original);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/^landform: .*classifier\.json: the file was altered or damaged after saving/);
    expect(r.stderr.split('\n')).toHaveLength(2);
    const table = join(dir, 'table.csv');
    writeFileSync(table, 'sample,label,a,b\ns1,x,1,2\ns2,y,3,4\n');
    const k = runCli(['predict', model, table]);
    expect(k.code).toBe(2);
    expect(k.stderr).toMatch(
      /is a table dataset, but the model was trained on points samples; give points samples\n$/,
    );
  });

  it('the shipped model loads and labels panels of its demo scenario', () => {
    // A few panels of each class from the shipped synthetic dataset (the model was trained on them: this
    // checks that the folder still loads and predicts with this version, not how well it generalises).
    const root = new URL('../../', import.meta.url).pathname;
    const lines = readFileSync(join(root, 'datasets', 'lattice.csv'), 'utf8')
      .trim()
      .split('\n');
    const perClass = new Map<string, string[]>();
    for (const line of lines.slice(1)) {
      const [sample, label] = line.split(',');
      const list = perClass.get(label) ?? [];
      if (!list.includes(sample) && list.length < 2) list.push(sample);
      perClass.set(label, list);
    }
    const chosen = new Set([...perClass.values()].flat());
    const subset = join(dir, 'panels.csv');
    writeFileSync(
      subset,
      [lines[0], ...lines.slice(1).filter((l) => chosen.has(l.split(',')[0]))].join('\n') + '\n',
    );
    const r = runCli(['predict', join(root, 'models', 'lattice'), subset, '--workers', '1']);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    const out = r.stdout.trim().split('\n');
    expect(out[0]).toBe('sample,predicted,score:broken-strut,score:intact,score:merged-cells');
    expect(out).toHaveLength(7);
    // The shipped model records its sample shape (2-D points) and so refuses 3-D ones.
    const manifest = JSON.parse(readFileSync(join(root, 'models', 'lattice', 'manifest.json'), 'utf8'));
    expect(manifest.record.sampleShape).toEqual({ dim: 2 });
    // A folder saved before the shape was recorded (test/fixtures/model-format-1) still loads and predicts.
    const old = runCli([
      'predict',
      join(root, 'test', 'fixtures', 'model-format-1'),
      subset,
      '--workers',
      '1',
    ]);
    expect(withoutCompletion(old.stderr)).toBe('');
    expect(old.code).toBe(0);
    expect(old.stdout.trim().split('\n')).toHaveLength(7);
  });

  it('refuses 3-D points for a model trained on 2-D points, naming the file', () => {
    expect(trained.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(model, 'manifest.json'), 'utf8'));
    expect(manifest.record.sampleShape).toEqual({ dim: 2 });
    const cube = join(dir, 'cube.csv');
    const rows = ['sample,label,x,y,z'];
    for (let i = 0; i < 8; i++) rows.push(`corner,,${i & 1},${(i >> 1) & 1},${(i >> 2) & 1}`);
    writeFileSync(cube, `${rows.join('\n')}\n`);
    const r = runCli(['predict', model, cube, '--workers', '1']);
    expect(r.stderr).toBe(
      `landform: ${cube}: has points in 3 dimensions, but the model was trained on points in 2; give 2-D points or train a model on these\n`,
    );
    expect(r.code).toBe(2);
    const v = runCli(['vectorize', cube, '--from-model', model, '--out', join(dir, 'v.csv')]);
    expect(v.stderr).toMatch(/has points in 3 dimensions, but the model was trained on points in 2/);
    expect(v.code).toBe(2);
  });
});
