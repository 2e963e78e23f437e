import { readFileSync, rmSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';

const dir = tempDir();
afterAll(() => rmSync(dir, { recursive: true, force: true }));

interface Metrics {
  quick: boolean;
  datasets: Array<{
    name: string;
    metrics: {
      classes: string[];
      folds: number;
      results: Array<{
        features: string;
        model: string;
        accuracy: { mean: number; std: number };
        confusion: number[][];
      }>;
    };
    contrastPermutations: number;
    contrasts: Array<{ a: string; b: string; degree: number; p: number; pAdjusted: number }>;
  }>;
}

describe('landform demo', () => {
  it('runs the study on the shipped datasets and writes metrics.json and report.html', () => {
    const out = join(dir, 'demo');
    const result = runCli(['demo', '--quick', '--out', out]);
    expect(
      withoutCompletion(result.stderr)
        .split('\n')
        .filter((l) => l !== '' && !l.startsWith('landform: demo ')),
    ).toEqual([]);
    // The completion line (src/cli/finish.ts) ends the run: 3 datasets of 75 samples each.
    expect(result.stderr).toMatch(
      /landform demo: wrote .*demo \(metrics\.json and report\.html, 225 samples, [\d.]+ s\)\n$/,
    );
    expect(result.code).toBe(0);
    expect(result.stdout).toContain(`metrics: ${join(out, 'metrics.json')}`);
    expect(result.stdout).toContain(`report:  ${join(out, 'report.html')}`);
    expect(result.stdout).toMatch(/^dataset\s+landscape \(best model\)\s+raw \(best model\)/m);

    const metrics = JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8')) as Metrics;
    expect(metrics.quick).toBe(true);
    expect(metrics.datasets.map((d) => d.name)).toEqual(['lattice', 'pump', 'field']);
    const bestOf = (d: Metrics['datasets'][number], features: string) =>
      Math.max(...d.metrics.results.filter((r) => r.features === features).map((r) => r.accuracy.mean));
    for (const d of metrics.datasets) {
      expect(d.metrics.classes.length).toBe(3);
      expect(d.metrics.folds).toBe(3);
      expect(new Set(d.metrics.results.map((r) => r.features))).toEqual(
        new Set(['landscape', 'raw', 'combined']),
      );
      // Every sample is predicted once: the pooled confusion matrix counts all 75 samples.
      for (const r of d.metrics.results) expect(r.confusion.flat().reduce((s, v) => s + v, 0)).toBe(75);
      expect(d.contrasts.length).toBeGreaterThan(0);
      // The quick demo's base of 199 permutations is raised to 100 · tests − 1 (adjusted p can reach 0.01).
      expect(d.contrastPermutations).toBe(Math.max(199, 100 * d.contrasts.length - 1));
    }
    // The demo's promises (issue 6): the best landscape model reaches 0.8 on the lattice set, and on at
    // least one set landscape features clearly beat raw features (by 0.1 or more).
    const lattice = metrics.datasets.find((d) => d.name === 'lattice')!;
    expect(bestOf(lattice, 'landscape')).toBeGreaterThanOrEqual(0.8);
    expect(metrics.datasets.some((d) => bestOf(d, 'landscape') - bestOf(d, 'raw') >= 0.1)).toBe(true);

    const html = readFileSync(join(out, 'report.html'), 'utf8');
    expect(html.match(/<section class="dataset"/g)?.length).toBe(3);
    for (const part of [
      'summary',
      'accuracy',
      'confusion',
      'samples',
      'distances',
      'means',
      'contrasts',
      'maps',
      'examples',
    ]) {
      expect(html.match(new RegExp(`data-part="${part}"`, 'g'))?.length, part).toBe(3);
    }
    expect(html.match(/<table class="grid chosen">/g)?.length).toBe(3);
    expect(html).toContain('Cross-validated accuracy is an estimate');
    expect(html).not.toMatch(/<script/i);
  }, 240_000);

  it('refuses a bad seed with one line and exit 2', () => {
    const result = runCli(['demo', '--seed', 'x', '--out', join(dir, 'bad')]);
    expect(result.code).toBe(2);
    expect(result.stderr).toBe("landform: --seed 'x' is not a whole number from 0 to 4294967295\n");
  });
});
