import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
import { imageTableCsv, mnistDigits } from '../helpers/mnist.js';

/** Digits 0, 1 and 8 of the open MNIST set (LeCun et al. 1998), images `from` … `from + perClass − 1` of each. */
function digitTable(from: number, perClass: number): string {
  return imageTableCsv(mnistDigits(perClass, { classes: [0, 1, 8], from, label: (d) => `digit-${d}` }));
}

const FILTRATIONS = 'height:1:0,height:0:1,erosion';
const SMALL = ['--depths', '2', '--grid-sizes', '10', '--inner-folds', '2', '--workers', '1', '--quiet'];

describe('several filtrations through evaluate, train, predict, contrast and landscape', () => {
  it('evaluate names features and report pages by filtration; train records the list; predict uses it', () => {
    const dir = tempDir();
    const input = join(dir, 'digits.csv');
    writeFileSync(input, digitTable(0, 8));
    const study = join(dir, 'study');
    const e = runCli([
      'evaluate',
      input,
      '--shape',
      '28x28',
      '--filtration',
      FILTRATIONS,
      '--feature-sets',
      'landscape',
      '--models',
      'pca-svm',
      '--folds',
      '3',
      ...SMALL,
      '--out',
      study,
    ]);
    expect(withoutCompletion(e.stderr)).toBe('');
    expect(e.code).toBe(0);
    const metrics = JSON.parse(readFileSync(join(study, 'metrics.json'), 'utf8'));
    expect(metrics.options.diagrams.filtration).toBe(FILTRATIONS);
    expect(metrics.options.shape).toEqual([28, 28]);
    // The report's class means have one page per filtration and degree.
    const report = readFileSync(join(study, 'report.html'), 'utf8');
    for (const name of ['height:1:0/H0', 'height:0:1/H1', 'erosion/H0', 'erosion/H1'])
      expect(report).toContain(`${name}: mean landscape per class`);

    const model = join(dir, 'model');
    const t = runCli([
      'train',
      input,
      '--shape',
      '28x28',
      '--filtration',
      FILTRATIONS,
      '--model',
      'pca-svm',
      ...SMALL,
      '--save',
      model,
    ]);
    expect(withoutCompletion(t.stderr)).toBe('');
    expect(t.code).toBe(0);
    expect(readFileSync(join(model, 'manifest.json'), 'utf8')).toContain('erosion');

    // New digits (images 8–11 of each class), never seen in training: predict recomputes their diagrams
    // under the saved filtrations. A 0, a 1 and an 8 differ in loops and in extent; a loose bar above the
    // chance of 1/3 (common practice, no source).
    const fresh = join(dir, 'fresh.csv');
    writeFileSync(fresh, digitTable(8, 4));
    const out = join(dir, 'predictions.csv');
    const p = runCli([
      'predict',
      model,
      fresh,
      '--shape',
      '28x28',
      '--workers',
      '1',
      '--quiet',
      '--out',
      out,
    ]);
    expect(p.stderr).toBe('');
    expect(p.code).toBe(0);
    const rows = readFileSync(out, 'utf8').trim().split('\n').slice(1);
    expect(rows).toHaveLength(12);
    const correct = rows.filter((r) => {
      const [sample, predicted] = r.split(',');
      return predicted === `digit-${sample.slice(1, 2)}`;
    }).length;
    expect(correct).toBeGreaterThanOrEqual(8);
  }, 240000);

  it('contrast tests every filtration × degree, and landscape reads one filtration of a tagged file', () => {
    const dir = tempDir();
    const input = join(dir, 'digits.csv');
    writeFileSync(input, digitTable(0, 6));
    const c = runCli([
      'contrast',
      input,
      '--shape',
      '28x28',
      '--filtration',
      FILTRATIONS,
      '--degrees',
      '0,1',
      '--permutations',
      '99',
      '--grid-size',
      '40',
      '--workers',
      '1',
      '--quiet',
    ]);
    expect(withoutCompletion(c.stderr)).toBe('');
    expect(c.code).toBe(0);
    const json = JSON.parse(c.stdout) as {
      family: string;
      tests: Array<{ filtration: string; degree: number; pAdjusted: number }>;
    };
    // 3 class pairs × 3 filtrations × 2 degrees, Holm over all of them (Holm 1979).
    expect(json.tests).toHaveLength(18);
    expect(json.family).toBe('all pairs of classes × all filtrations × all degrees');
    expect(new Set(json.tests.map((t) => `${t.filtration}/H${t.degree}`)).size).toBe(6);

    const diagrams = join(dir, 'diagrams.csv');
    const d = runCli([
      'diagrams',
      input,
      '--shape',
      '28x28',
      '--filtration',
      FILTRATIONS,
      '--workers',
      '1',
      '--quiet',
      '--out',
      diagrams,
    ]);
    expect(d.code).toBe(0);
    const missing = runCli(['landscape', diagrams, '--sample', 'd0-0', '--degree', '1']);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toMatch(
      /holds diagrams of 3 filtrations \(height:1:0, height:0:1, erosion\); choose one with --from\n$/,
    );
    const l = runCli(['landscape', diagrams, '--sample', 'd0-0', '--degree', '1', '--from', 'erosion']);
    expect(withoutCompletion(l.stderr)).toBe('');
    expect(l.code).toBe(0);
    const body = JSON.parse(l.stdout) as {
      degree: number;
      layers: number[][];
      provenance: { options: Record<string, unknown> };
    };
    expect(body.degree).toBe(1);
    expect(body.provenance.options.filtration).toBe('erosion');
    const bad = runCli(['landscape', diagrams, '--from', 'grey']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/--from grey is not in the file; it has height:1:0, height:0:1, erosion\n$/);
  }, 240000);
});
