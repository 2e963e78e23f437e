import { describe, expect, it } from 'vitest';
import type { DiagramSet } from '../../src/core/diagram.js';
import type { Matrix } from '../../src/core/matrix.js';
import { Random } from '../../src/core/random.js';
import type { Dataset, PointSample } from '../../src/core/sample.js';
import { drawShape, SHAPE_LABELS } from '../../src/demo/scenarios/shapes.js';
import { learnGrid } from '../../src/features/landscape-vectorizer.js';
import { pairwiseDistances } from '../../src/homology/metric.js';
import { ripsPersistence } from '../../src/homology/rips.js';
import type { Classifier, Hyperparameters, ModelName } from '../../src/learn/classifier.js';
import { formatMetricsJson, mostFrequent, runEvaluation } from '../../src/learn/evaluate.js';
import type { ModelFactory } from '../../src/learn/select.js';

/** A test-only classifier: nearest class centroid, scores by softmax of negative distances. Not a shipped model. */
class NearestCentroid implements Classifier {
  readonly name: ModelName = 'pca-svm';
  centroids?: Float64Array;
  classCount = 0;
  cols = 0;
  fitRows: number[];
  constructor(
    readonly hyperparameters: Hyperparameters,
    fitRows: number[],
  ) {
    this.fitRows = fitRows;
  }
  async fit(x: Matrix, y: Int32Array, classCount: number): Promise<void> {
    this.fitRows.push(x.rows);
    this.classCount = classCount;
    this.cols = x.cols;
    const c = new Float64Array(classCount * x.cols);
    const n = new Float64Array(classCount);
    for (let i = 0; i < x.rows; i++) {
      n[y[i]]++;
      for (let j = 0; j < x.cols; j++) c[y[i] * x.cols + j] += x.data[i * x.cols + j];
    }
    for (let k = 0; k < classCount; k++)
      for (let j = 0; j < x.cols; j++) c[k * x.cols + j] /= Math.max(1, n[k]);
    this.centroids = c;
  }
  async predictScores(x: Matrix): Promise<Matrix> {
    const out = new Float64Array(x.rows * this.classCount);
    const shrink = Number(this.hyperparameters.shrink ?? 1);
    for (let i = 0; i < x.rows; i++) {
      let total = 0;
      for (let k = 0; k < this.classCount; k++) {
        let d = 0;
        for (let j = 0; j < x.cols; j++)
          d += (x.data[i * x.cols + j] - shrink * this.centroids![k * x.cols + j]) ** 2;
        out[i * this.classCount + k] = Math.exp(-Math.sqrt(d));
        total += out[i * this.classCount + k];
      }
      for (let k = 0; k < this.classCount; k++)
        out[i * this.classCount + k] = total > 0 ? out[i * this.classCount + k] / total : 1 / this.classCount;
    }
    return { rows: x.rows, cols: this.classCount, data: out };
  }
  async toJSON(): Promise<unknown> {
    return {};
  }
  dispose(): void {}
}

function centroidFactory(fitRows: number[] = []): ModelFactory {
  return {
    create: (_name, hyper) => new NearestCentroid(hyper, fitRows),
    candidates: () => [{ shrink: 1 }, { shrink: 0.5 }],
  };
}

/** Seeded shapes that differ in topology only: a filled disc (no loop), a circle (one), a figure eight (two). */
function shapes(perClass: number, points: number, seed: number): Dataset<PointSample> {
  const r = new Random(seed);
  const samples: PointSample[] = [];
  for (const label of SHAPE_LABELS) {
    for (let s = 0; s < perClass; s++) {
      const coords = drawShape(label, points, 0.03, r);
      samples.push({ kind: 'points', id: `${label}-${s}`, label, dim: 2, count: points, coords });
    }
  }
  return { kind: 'points', source: 'generated', samples };
}

function ripsDiagrams(dataset: Dataset): DiagramSet[] {
  return dataset.samples.map((s) => {
    if (s.kind !== 'points') throw new Error('points expected');
    return {
      sample: s.id,
      label: s.label,
      diagrams: ripsPersistence(s.count, pairwiseDistances(s.coords, s.count, s.dim), { maxDegree: 1 }),
    };
  });
}

describe('runEvaluation', () => {
  const data = shapes(10, 40, 3);
  const diagrams = ripsDiagrams(data);

  it('fits everything inside the training folds and reports per-fold outcomes', async () => {
    const fitRows: number[] = [];
    const result = await runEvaluation(data, {
      diagrams,
      folds: 5,
      seed: 2,
      models: ['pca-svm'],
      featureSets: ['landscape', 'raw'],
      modelFactory: centroidFactory(fitRows),
      landscapeCandidates: [
        { depth: 2, gridSize: 10 },
        { depth: 3, gridSize: 20 },
      ],
    });
    expect(result.classes).toEqual(['disc', 'eight', 'loop']);
    expect(result.results.map((r) => r.features)).toEqual(['landscape', 'raw']);
    // Outer training folds hold 24 samples; inner (3-fold) training sets 16; nothing ever fits on all 30.
    expect(Math.max(...fitRows)).toBe(24);
    expect(fitRows.filter((n) => n === 24)).toHaveLength(10);
    expect(fitRows.every((n) => n === 24 || n === 16)).toBe(true);
    const landscape = result.results[0];
    expect(landscape.folds).toHaveLength(5);
    for (const f of landscape.folds) {
      const test = new Set(f.test);
      const train = Int32Array.from(data.samples.map((_, i) => i).filter((i) => !test.has(i)));
      const depth = Number(f.chosen.depth);
      expect([2, 3]).toContain(depth);
      expect(f.grids![1].grid).toEqual(
        learnGrid(diagrams, train, 1, { mode: 'drop' }, 0.99, Number(f.chosen.gridSize)),
      );
      expect(f.featureNames).toHaveLength(2 * depth * Number(f.chosen.gridSize));
      expect(f.scores.rows).toBe(f.test.length);
    }
    const pooled = landscape.confusion.flat().reduce((a, b) => a + b, 0);
    expect(pooled).toBe(30);
    expect(landscape.chosen.perFold).toHaveLength(5);
  });

  it('gives a byte-identical metrics.json for the same seed and a different one for another seed', async () => {
    const options = {
      diagrams,
      folds: 3,
      models: ['pca-svm'] as ModelName[],
      modelFactory: centroidFactory(),
      landscapeCandidates: [{ depth: 2, gridSize: 8 }],
    };
    const a = formatMetricsJson(await runEvaluation(data, { ...options, seed: 5 }));
    const b = formatMetricsJson(await runEvaluation(data, { ...options, seed: 5 }));
    const c = formatMetricsJson(await runEvaluation(data, { ...options, seed: 6 }));
    expect(a).toBe(b);
    expect(a).not.toBe(c);
    const doc = JSON.parse(a);
    expect(Object.keys(doc)).toEqual([
      'classes',
      'folds',
      'repeats',
      'seed',
      'options',
      'version',
      'results',
    ]);
    expect(Object.keys(doc.results[0])).toEqual([
      'features',
      'model',
      'accuracy',
      'balancedAccuracy',
      'macroF1',
      'confusion',
      'chosen',
    ]);
    expect(doc.results.map((r: { features: string }) => r.features)).toEqual([
      'landscape',
      'raw',
      'combined',
    ]);
  });

  it('refuses one class or a class smaller than the folds before any work', async () => {
    const one: Dataset = { ...data, samples: data.samples.filter((s) => s.label === 'disc') };
    await expect(runEvaluation(one, { diagrams, modelFactory: centroidFactory() })).rejects.toThrow(
      /only one class/,
    );
    const small: Dataset = {
      ...data,
      samples: data.samples.filter((s) => s.label !== 'loop' || s.id < 'loop-3'),
    };
    await expect(runEvaluation(small, { folds: 5, modelFactory: centroidFactory() })).rejects.toThrow(
      "class 'loop' has 3 samples, fewer than the 5 folds asked for; use --folds 3 or fewer",
    );
  });

  it('separates shapes that differ only in topology with landscape features (pca-svm), raw baseline beside', async () => {
    const big = shapes(20, 50, 11);
    const result = await runEvaluation(big, {
      diagrams: ripsDiagrams(big),
      folds: 5,
      seed: 1,
      models: ['pca-svm'],
      featureSets: ['landscape', 'raw'],
      // The shapes differ in their loops, so the H1 landscape carries the difference.
      landscape: { degrees: [1] },
      landscapeCandidates: [{ depth: 3, gridSize: 25 }],
    });
    const landscape = result.results.find((r) => r.features === 'landscape')!;
    const raw = result.results.find((r) => r.features === 'raw')!;
    // Goal from the issue (common practice, no source): ≥ 0.95 cross-validated accuracy on these shapes.
    console.log(
      `topology shapes: landscape ${landscape.accuracy.mean.toFixed(3)}, raw ${raw.accuracy.mean.toFixed(3)}`,
    );
    expect(landscape.accuracy.mean).toBeGreaterThanOrEqual(0.95);
    // The raw D2 baseline is reported beside it; it is a strong baseline (Osada et al. 2002), so it is only
    // required to beat chance here, not to lose.
    expect(raw.accuracy.mean).toBeGreaterThan(1 / 3);
  });
});

describe('mostFrequent', () => {
  it('picks the most frequent record, ties to the first seen', () => {
    expect(mostFrequent([{ C: 1 }, { C: 10 }, { C: 10 }])).toEqual({ C: 10 });
    expect(mostFrequent([{ C: 1 }, { C: 10 }])).toEqual({ C: 1 });
  });
});
