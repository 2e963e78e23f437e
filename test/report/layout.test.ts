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
      { depth: 3, gridSize: 40, draws: 200, permutations: 199, importanceRepeats: 2 },
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
    expect(report.options.contrasts).toMatch(/^199 permutations per test \(as given\)/);

    // Sample maps: landscape (with the chosen depth and grid) and raw, every sample once. One long H1 bar
    // against none is the largest difference in the landscape features, so in the plane of PC1 and PC2 the
    // classes form apart: at least 18 of 20 samples lie nearer their own class centre than the other's (a loose
    // check, common practice, no source).
    expect(report.sampleMaps?.map((m) => m.features)).toEqual(['landscape', 'raw']);
    const land = report.sampleMaps![0];
    expect(land.made).toBe('depth 2, grid 16, as chosen most often for pca-svm');
    expect(land.points).toHaveLength(20);
    const centre = (label: string) => {
      const mine = land.points.filter((p) => p.label === label);
      return [
        mine.reduce((s, p) => s + p.pc1, 0) / mine.length,
        mine.reduce((s, p) => s + p.pc2, 0) / mine.length,
      ];
    };
    const centres = { disc: centre('disc'), ring: centre('ring') };
    const near = land.points.filter((p) => {
      const own = centres[p.label as 'disc' | 'ring'];
      const other = centres[p.label === 'disc' ? 'ring' : 'disc'];
      return Math.hypot(p.pc1 - own[0], p.pc2 - own[1]) < Math.hypot(p.pc1 - other[0], p.pc2 - other[1]);
    }).length;
    expect(near).toBeGreaterThanOrEqual(18);
    // Distance map: every sample (20 < the cap), ordered by class, on the channel with the clearer contrasts.
    const map = report.distanceMap!;
    expect(map.samples.map((x) => x.label)).toEqual([...Array(10).fill('disc'), ...Array(10).fill('ring')]);
    expect(map.boundaries).toEqual([10]);
    expect(map.channel).toEqual({ degree: 1 });
    // Per-fold choices: one row per distinct choice of each of the two results, two folds in all per result.
    for (const features of ['landscape', 'raw'])
      expect(
        report.chosen?.filter((r) => r.features === features).reduce((n, r) => n + r.folds.length, 0),
      ).toBe(2);
  }, 60_000);

  it('chooses the permutations for the family when none are given and records them', async () => {
    const dataset = rings();
    const diagrams = dataset.samples.map((s) => computeDiagrams(s, { degrees: [0, 1] }));
    const landscape = { degrees: [1] };
    const evaluation = await runEvaluation(dataset, {
      diagrams,
      folds: 2,
      models: ['pca-svm'],
      featureSets: ['landscape'],
      landscape,
      landscapeCandidates: [{ depth: 2, gridSize: 16 }],
      innerFolds: 2,
    });
    const pieces = await buildDatasetReport(
      { name: 'rings', dataset, diagrams, evaluation, landscape },
      { depth: 2, gridSize: 30, draws: 100, basePermutations: 49, importanceRepeats: 1 },
    );
    // One test: 100 · 1 − 1 = 99 relabellings reach an adjusted p of 0.01; above the base of 49.
    expect(pieces.permutations).toBe(99);
    expect(pieces.report.options.contrasts).toMatch(
      /^99 permutations per test \(raised from 49 for a family of 1 tests/,
    );
    expect(pieces.report.contrastReach).toMatchObject({ tests: 1, permutations: 99, reachable: true });
    expect(pieces.report.sampleMaps?.map((m) => m.features)).toEqual(['landscape']);
  }, 60_000);
});
