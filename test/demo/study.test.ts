import { existsSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { packageRoot } from '../../src/core/version.js';
import { SCENARIOS } from '../../src/demo/scenarios/index.js';
import { accuracyTable, DEMO_DATASETS, demoMetricsJson } from '../../src/demo/study.js';

describe('demoMetricsJson and accuracyTable', () => {
  it('keep one entry per dataset holding the evaluate layout', () => {
    const outcome = {
      spec: { name: 'set-a', path: 'datasets/a.csv' },
      evaluation: { results: [result2('landscape', 0.9), result2('raw', 0.5)] },
      pieces: {
        contrasts: [
          { a: 'x', b: 'y', degree: 1, statistic: 0.123456789, p: 0.001, pAdjusted: 0.003, sizes: [5, 5] },
        ],
      },
    } as never;
    const json = JSON.parse(demoMetricsJson([outcome], 7, true, () => '{"classes":["x","y"]}')) as {
      seed: number;
      datasets: Array<{ name: string; metrics: unknown; contrasts: Array<{ statistic: number }> }>;
    };
    expect(json.seed).toBe(7);
    expect(json.datasets[0].name).toBe('set-a');
    expect(json.datasets[0].metrics).toEqual({ classes: ['x', 'y'] });
    expect(json.datasets[0].contrasts[0].statistic).toBe(0.123457);
    const table = accuracyTable([outcome]).split('\n');
    expect(table[0]).toMatch(
      /^dataset\s+landscape \(best model\)\s+raw \(best model\)\s+combined \(best model\)$/,
    );
    expect(table[1]).toMatch(/^set-a\s+0\.90 ± 0\.05 pca-svm\s+0\.50 ± 0\.05 pca-svm\s+—$/);
  });
});

function result2(features: string, mean: number) {
  return { features, model: 'pca-svm', accuracy: { mean, std: 0.05 } };
}

describe('the scenario catalogue', () => {
  it('is the one source of the demo datasets: names, files, kinds, words and study options', () => {
    expect(DEMO_DATASETS.map((d) => d.name)).toEqual(SCENARIOS.map((s) => s.name));
    for (const s of SCENARIOS) {
      const d = DEMO_DATASETS.find((x) => x.name === s.name);
      expect(d?.path).toBe(join('datasets', s.path));
      expect(existsSync(join(packageRoot(), d?.path ?? ''))).toBe(true);
      expect(d?.kind).toBe(s.kind);
      expect(d?.description).toContain(s.summary);
      expect(d?.description).toContain(s.advice);
      expect(d?.landscapeCandidates).toEqual(s.study.landscapeCandidates);
    }
  });

  it('describes the classes its generators make', () => {
    for (const s of SCENARIOS) {
      const labels = [...new Set(s.samples().map((x) => x.label))].sort();
      expect(labels).toEqual([...s.classes].sort());
      for (const c of s.classes) expect(s.summary).toContain(c);
    }
  });
});
