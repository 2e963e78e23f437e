import { existsSync, readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
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
      '--feature-sets',
      'landscape,raw',
      '--seed',
      '3',
      '--out',
      join(dir, 'a'),
    ]);
    expect(withoutCompletion(a.stderr)).toBe('');
    expect(a.code).toBe(0);
    expect(a.stdout).toMatch(/^landscape {2}pca-svm {2}accuracy \d\.\d{3} ± \d\.\d{3}/);
    const b = runCli([
      'evaluate',
      input,
      ...FAST,
      '--feature-sets',
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
      'paired',
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
      'foldScores',
    ]);
    expect(r0.confusion.flat().reduce((s: number, v: number) => s + v, 0)).toBe(12);
    expect(r0.chosen.perFold).toHaveLength(3);
    expect(r0.chosen.mostFrequent.depth).toBe(2);
    expect(r0.accuracy.mean).toBeGreaterThanOrEqual(0);
    expect(r0.accuracy.mean).toBeLessThanOrEqual(1);

    // Beside metrics.json: out-of-fold predictions and per-fold scores, byte-identical for the same seed,
    // each with a provenance sidecar; the paired landscape − raw difference in metrics.json, on stdout and
    // under the report's accuracy chart.
    for (const name of ['predictions.csv', 'folds.csv']) {
      const text = readFileSync(join(dir, 'a', name), 'utf8');
      expect(readFileSync(join(dir, 'b', name), 'utf8')).toBe(text);
      const sidecar = JSON.parse(readFileSync(join(dir, 'a', `${name}.provenance.json`), 'utf8'));
      expect(sidecar.command).toBe('evaluate');
      expect(sidecar.seed).toBe(3);
      expect(sidecar.options.features).toEqual(['landscape', 'raw']);
    }
    const predictions = readFileSync(join(dir, 'a', 'predictions.csv'), 'utf8')
      .trim()
      .split('\n');
    expect(predictions[0]).toBe('sample,label,features,model,repeat,fold,predicted,score:disc,score:loop');
    expect(predictions).toHaveLength(1 + 2 * 12);
    const folds = readFileSync(join(dir, 'a', 'folds.csv'), 'utf8')
      .trim()
      .split('\n');
    expect(folds).toHaveLength(1 + 2 * 3);
    expect(doc.paired).toHaveLength(1);
    const p = doc.paired[0];
    expect([p.features, p.baseline, p.model, p.pairs]).toEqual(['landscape', 'raw', 'pca-svm', 3]);
    expect(p.mean).toBeCloseTo(r0.accuracy.mean - doc.results[1].accuracy.mean, 5);
    expect(p.interval.lower).toBeLessThanOrEqual(p.mean);
    expect(p.interval.upper).toBeGreaterThanOrEqual(p.mean);
    expect(a.stdout).toMatch(
      /\nlandscape − raw +pca-svm +[+-]?\d\.\d{3} \[[+-]?\d\.\d{3}, [+-]?\d\.\d{3}\] {2}95% interval over 3 paired folds/,
    );
    const html = readFileSync(join(dir, 'a', 'report.html'), 'utf8');
    expect(html).toContain('<tr data-paired="landscape/pca-svm"><td>landscape − raw</td><td>pca-svm</td>');
    expect(html).toContain('corrected resampled t interval (Nadeau &amp; Bengio, 2003)');
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

describe('landform evaluate: fixed model values, PCA variance and progress lines', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  writeShapes(input, 6, 20);

  it('refuses bad values with one line and exit 2', () => {
    const cases: Array<[string[], RegExp]> = [
      [['--svm-c', '0'], /^landform: --svm-c '0' must be greater than 0\n$/],
      [['--svm-c', 'ten'], /^landform: --svm-c 'ten' is not a finite decimal number\n$/],
      [['--svm-gamma', '-1'], /^landform: --svm-gamma '-1' must be greater than 0\n$/],
      [['--svm-kernel', 'poly'], /^landform: --svm-kernel 'poly' is not known; choose from linear, rbf\n$/],
      [['--svm-kernel', 'linear', '--svm-gamma', '0.1'], /^landform: --svm-gamma applies to the rbf kernel/],
      [
        ['--pca-variance', '1.5'],
        /^landform: --pca-variance '1.5' must be a share in \(0, 1\] such as 0\.95, or 'all'\n$/,
      ],
      [['--pca-variance', 'most'], /^landform: --pca-variance 'most' must be a share/],
      [
        ['--models', 'dense', '--svm-c', '1'],
        /^landform: --svm-kernel, --svm-c, --svm-gamma and --pca-variance apply to pca-svm/,
      ],
      [['--progress', 'loud'], /^landform: --progress must be one of auto, lines, none, got 'loud'\n$/],
    ];
    for (const [extra, message] of cases) {
      const r = runCli(['evaluate', input, ...FAST, ...extra, '--out', join(dir, 'never')]);
      expect(r.code, extra.join(' ')).toBe(2);
      expect(r.stderr, extra.join(' ')).toMatch(message);
      expect(r.stderr.split('\n')).toHaveLength(2);
    }
    expect(existsSync(join(dir, 'never'))).toBe(false);
  });

  it('records the fixed values, uses them in every fold, and prints phase lines in a pipe when asked', () => {
    const out = join(dir, 'fixed');
    const r = runCli([
      'evaluate',
      input,
      ...FAST,
      '--feature-sets',
      'raw',
      '--svm-kernel',
      'rbf',
      '--svm-c',
      '10',
      '--pca-variance',
      'all',
      '--progress',
      'lines',
      '--out',
      out,
    ]);
    expect(r.code).toBe(0);
    // One line per phase start and end at least; each names the phase and counts done/total.
    const lines = r.stderr.trim().split('\n');
    expect(lines[0]).toMatch(/^landform: inner CV 0\/3 \(0%\), 0s elapsed$/);
    expect(lines).toContainEqual(expect.stringMatching(/^landform: inner CV 3\/3 \(100%\), done in \d+s$/));
    expect(lines).toContainEqual(
      expect.stringMatching(/^landform: outer folds 3\/3 \(100%\), done in \d+s$/),
    );
    const doc = JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8'));
    expect(doc.options.fixed).toEqual({ 'pca-svm': { C: 10, kernel: 'rbf', varianceKept: 1 } });
    expect(doc.options.modelOptions).toEqual({
      'pca-svm': { kernel: 'rbf', C: 10, gamma: 'searched', pcaVariance: 'all' },
    });
    for (const h of doc.results[0].chosen.perFold) {
      expect(h.kernel).toBe('rbf');
      expect(h.C).toBe(10);
      expect(h.varianceKept).toBe(1);
    }
    // The same study without --progress stays quiet in a pipe (the default).
    const quiet = runCli(['evaluate', input, ...FAST, '--feature-sets', 'raw', '--out', join(dir, 'plain')]);
    expect(withoutCompletion(quiet.stderr)).toBe('');
  });

  it('LANDFORM_PROGRESS=lines asks for the lines too', () => {
    const r = runCli(['evaluate', input, ...FAST, '--feature-sets', 'raw', '--out', join(dir, 'env')], {
      env: { LANDFORM_PROGRESS: 'lines' },
    });
    expect(r.code).toBe(0);
    expect(r.stderr).toMatch(/^landform: inner CV 0\/3/);
  });
});
