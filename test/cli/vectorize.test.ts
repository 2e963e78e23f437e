import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseLandscapeFeatureName } from '../../src/features/landscape-vectorizer.js';
import { COMPLETION_LINE, runCli, tempDir } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

describe('landform vectorize', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  writeShapes(input, 3, 15);

  it('writes a CSV with sample,label and names that map to (degree, layer, t)', () => {
    const out = join(dir, 'features.csv');
    const r = runCli([
      'vectorize',
      input,
      '--depth',
      '2',
      '--grid-size',
      '5',
      '--workers',
      '1',
      '--out',
      out,
    ]);
    expect(r.code).toBe(0);
    expect(r.stdout).toBe('');
    expect(r.stderr.trimEnd()).toMatch(COMPLETION_LINE);
    expect(r.stderr).toContain(
      `landform vectorize: wrote ${out} (20 landscape features fitted on all the given samples, 6 samples, `,
    );
    const lines = readFileSync(out, 'utf8').trim().split('\n');
    const header = lines[0].split(',');
    expect(header.slice(0, 2)).toEqual(['sample', 'label']);
    expect(header).toHaveLength(22);
    expect(parseLandscapeFeatureName(header[2])).toEqual({ degree: 0, layer: 1, t: 0 });
    expect(parseLandscapeFeatureName(header[12])).toMatchObject({ degree: 1, layer: 1 });
    expect(lines).toHaveLength(7);
    expect(existsSync(`${out}.provenance.json`)).toBe(true);
  });

  it('writes .npy with sidecars, and with --model uses the saved grid (transform only)', () => {
    const model = join(dir, 'model');
    expect(
      runCli([
        'train',
        input,
        '--depths',
        '2',
        '--grid-sizes',
        '6',
        '--inner-folds',
        '2',
        '--workers',
        '1',
        '--save',
        model,
      ]).code,
    ).toBe(0);
    const out = join(dir, 'features.npy');
    const r = runCli(['vectorize', input, '--from-model', model, '--workers', '1', '--out', out]);
    expect(r.code).toBe(0);
    expect(r.stderr).toContain('(24 landscape features fitted on the saved model, 6 samples, ');
    const columns = readFileSync(join(dir, 'features.columns.csv'), 'utf8').trim().split('\n');
    expect(columns).toHaveLength(25);
    const manifest = JSON.parse(readFileSync(join(model, 'manifest.json'), 'utf8'));
    const h1 = manifest.extractor.landscape.state.grids[1].grid;
    expect(parseLandscapeFeatureName(columns[13])!.t).toBeCloseTo(h1.start, 3);
    expect(readFileSync(join(dir, 'features.samples.csv'), 'utf8').split('\n')[0]).toBe('sample,label');
  });

  it('prints the CSV without --out, refuses NPY there, and landscape features for a table', () => {
    const r = runCli(['vectorize', input, '--depth', '2', '--grid-size', '5', '--workers', '1']);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe('');
    const lines = r.stdout.trim().split('\n');
    expect(lines).toHaveLength(7);
    expect(lines[0].split(',')).toHaveLength(22);
    const npy = runCli(['vectorize', input, '--format', 'npy']);
    expect(npy.code).toBe(2);
    expect(npy.stderr).toBe(
      'landform: NPY needs --out FILE: its sample and column lists are written beside it\n',
    );
    const table = join(dir, 'table.csv');
    writeFileSync(table, 'sample,label,a,b\ns1,x,1,2\ns2,y,3,4\n');
    const t = runCli(['vectorize', table, '--out', join(dir, 'never.csv')]);
    expect(t.code).toBe(2);
    expect(t.stderr).toBe(
      'landform: --feature-set landscape needs diagrams, but a table dataset has only its columns; use --feature-set raw\n',
    );
    expect(existsSync(join(dir, 'never.csv'))).toBe(false);
  });
});

describe('landform vectorize: feature budget', () => {
  it('refuses --depth 1000 --grid-size 100000 before loading, with the column count and the limit', () => {
    const dir = tempDir();
    const input = join(dir, 'shapes.csv');
    writeShapes(input, 2, 10);
    const out = join(dir, 'f.csv');
    const r = runCli(['vectorize', input, '--depth', '1000', '--grid-size', '100000', '--out', out]);
    // Degrees 0,1 × 1,000 layers × 100,000 points.
    expect(r.stderr).toBe(
      'landform: --degrees × --depth × --grid-size make 200000000 feature columns a sample, above the limit of 200000; use fewer layers or grid points\n',
    );
    expect(r.code).toBe(2);
    expect(existsSync(out)).toBe(false);
  });
});
