import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import type { Dataset, PointSample } from '../../src/core/sample.js';
import { computeDiagrams } from '../../src/homology/compute.js';
import { runEvaluation } from '../../src/learn/evaluate.js';
import { buildDatasetReport } from '../../src/report/layout.js';

/** Noisy circles (one loop) against filled discs (no loop) of the same size, made here with a seeded generator. */
function rings(): Dataset<PointSample> {
  const random = new Random(31);
  const samples: PointSample[] = [];
  for (const label of ['disc', 'ring']) {
    for (let i = 0; i < 10; i++) {
      const count = 36;
      const coords = new Float64Array(count * 2);
      for (let p = 0; p < count; p++) {
        const a = random.uniform(0, 2 * Math.PI);
        const r = label === 'ring' ? 1 + random.normal(0, 0.04) : Math.sqrt(random.next());
        coords[2 * p] = r * Math.cos(a);
        coords[2 * p + 1] = r * Math.sin(a);
      }
      samples.push({ kind: 'points', id: `${label}-${i}`, label, dim: 2, count, coords });
    }
  }
  return { kind: 'points', source: 'made in the test', samples };
}

describe('buildDatasetReport', () => {
  it('turns an evaluation into every part of the report, with the loop visible in H1', async () => {
    const dataset = rings();
    const diagrams = dataset.samples.map((s) => computeDiagrams(s, { degrees: [0, 1] }));
    const landscape = { degrees: [0, 1] };
    const evaluation = await runEvaluation(dataset, {
      diagrams,
      folds: 2,
      models: ['pca-svm'],
      featureSets: ['landscape', 'raw'],
      landscape,
      landscapeCandidates: [{ depth: 2, gridSize: 16 }],
      innerFolds: 2,
    });
    const { report, means, contrasts } = await buildDatasetReport(
      { name: 'rings', dataset, diagrams, evaluation, landscape },
      { depth: 3, gridCount: 40, draws: 200, permutations: 199, importanceRepeats: 2 },
    );
    expect(means.map((m) => m.degree)).toEqual([0, 1]);
    expect(report.summary.classes).toEqual([
      { label: 'disc', count: 10 },
      { label: 'ring', count: 10 },
    ]);
    expect(report.accuracy.map((a) => `${a.features}/${a.model}`)).toEqual([
      'landscape/pca-svm',
      'raw/pca-svm',
    ]);
    expect(report.confusions[0].matrix.flat().reduce((s, v) => s + v, 0)).toBe(20);
    expect(report.examples.map((e) => e.label)).toEqual(['disc', 'ring']);
    // A round loop of radius 1 has one long H1 bar (Adamaszek & Adams, "The Vietoris–Rips complexes of a
    // circle", 2017: the Rips complex of the circle is homotopy equivalent to a circle up to the chord of
    // 2π/3, √3 · r in the edge-length convention), while a filled disc has only short bars: the ring's mean
    // λ1 in H1 rises far above the disc's and the band edges part.
    const h1 = means[1];
    const ring = h1.classes.find((c) => c.label === 'ring')!.band;
    const disc = h1.classes.find((c) => c.label === 'disc')!.band;
    let parted = false;
    for (let j = 0; j < h1.grid.count; j++) if (ring.lower[j] > disc.upper[j]) parted = true;
    expect(parted).toBe(true);
    const h1test = contrasts.find((t) => t.degree === 1)!;
    expect(h1test.pAdjusted).toBeLessThan(0.05);
    // Maps: the linear weights live on H0 and H1 and the importance names every degree × layer group.
    expect(new Set(report.maps?.weights?.curves.map((c) => c.degree))).toEqual(new Set([0, 1]));
    expect(report.maps?.importance?.rows.map((r) => r.group)).toEqual(['H0 λ1', 'H0 λ2', 'H1 λ1', 'H1 λ2']);
    expect(report.findings?.some((f) => /contrasts show different mean landscapes/.test(f))).toBe(true);
  }, 60_000);
});
