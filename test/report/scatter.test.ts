import { PCA as MlPca } from 'ml-pca';
import { describe, expect, it } from 'vitest';
import type { Matrix } from '../../src/core/matrix.js';
import { renderSvg } from '../../src/report/charts.js';
import { CATEGORY_COLOURS } from '../../src/report/palette.js';
import { axisTitle, principalPlane, sampleMap, sampleMapChart } from '../../src/report/scatter.js';
import { irisDataset } from '../helpers/iris.js';

/** Fisher's Iris as a matrix (Fisher, "The use of multiple measurements in taxonomic problems", 1936). */
function irisMatrix(): { x: Matrix; samples: Array<{ id: string; label: string }> } {
  const ds = irisDataset();
  const data = new Float64Array(ds.samples.length * 4);
  ds.samples.forEach((s, i) => {
    data.set(s.values, i * 4);
  });
  return {
    x: { rows: ds.samples.length, cols: 4, data },
    samples: ds.samples.map((s) => ({ id: s.id, label: s.label })),
  };
}

describe('principalPlane', () => {
  it('gives standardised Iris the PC scores and variance shares of a reference PCA', async () => {
    const { x } = irisMatrix();
    const { scores, explained } = await principalPlane(x);
    // Reference: ml-pca on the correlation matrix (center and scale; Jolliffe, "Principal Component
    // Analysis", 2nd ed., 2002, §2.3: PCA of standardised variables is PCA of the correlation matrix).
    const rows = Array.from({ length: x.rows }, (_, i) => Array.from(x.data.subarray(i * 4, i * 4 + 4)));
    const reference = new MlPca(rows, { center: true, scale: true });
    const shares = reference.getExplainedVariance();
    expect(explained[0]).toBeCloseTo(shares[0], 10);
    expect(explained[1]).toBeCloseTo(shares[1], 10);
    // The first component of standardised Iris holds 72.96% of the variance (checked here against ml-pca
    // above, not recalled): PC1 + PC2 together 95.81%.
    expect(explained[0]).toBeCloseTo(0.7296, 4);
    expect(explained[0] + explained[1]).toBeCloseTo(0.9581, 4);
    // Scores agree up to each component's sign and the scaler's divisor: ours standardises with the
    // population sd (divisor n), ml-pca with the sample sd (n − 1), so ours = ml-pca × √(n/(n − 1)).
    const ref = reference.predict(rows, { nComponents: 2 });
    const factor = Math.sqrt(x.rows / (x.rows - 1));
    for (let c = 0; c < 2; c++) {
      const sign = Math.sign(scores.data[c]) * Math.sign(ref.get(0, c));
      for (let i = 0; i < x.rows; i++)
        expect(scores.data[i * 2 + c]).toBeCloseTo(sign * factor * ref.get(i, c), 8);
    }
  });

  it('gives zeros as second scores when the data have one direction only', async () => {
    const x: Matrix = { rows: 4, cols: 2, data: Float64Array.from([0, 0, 1, 2, 2, 4, 3, 6]) };
    const { scores, explained } = await principalPlane(x);
    expect(explained[0]).toBeCloseTo(1, 12);
    expect(explained[1]).toBeCloseTo(0, 12);
    for (let i = 0; i < 4; i++) expect(scores.data[i * 2 + 1]).toBeCloseTo(0, 10);
  });
});

describe('sampleMapChart', () => {
  it('colours every sample by its class with the page colours and puts the variance shares in the axis titles', async () => {
    const { x, samples } = irisMatrix();
    const map = await sampleMap(x, samples, 'raw');
    expect(map.points).toHaveLength(150);
    expect(map.points[0]).toMatchObject({ sample: 'iris-0', label: 'setosa' });
    const classes = ['setosa', 'versicolor', 'virginica'];
    const svg = await renderSvg(sampleMapChart(map, classes, 'raw features'));
    const marks = [...svg.matchAll(/<path aria-label="([^"]*)"[^>]*?fill="([^"]+)"/g)].filter((m) =>
      m[1].includes('; class: '),
    );
    expect(marks).toHaveLength(150);
    for (const [, label, fill] of marks) {
      const cls = /class: ([a-z]+)/.exec(label)?.[1] ?? '';
      expect(fill.toLowerCase()).toBe(CATEGORY_COLOURS[classes.indexOf(cls)]);
    }
    expect(svg).toContain(axisTitle(1, map.explained[0]));
    expect(axisTitle(1, map.explained[0])).toBe('PC1 · 73.0% of variance');
    expect(svg).toContain('PC2 · 22.9% of variance');
  });
});
