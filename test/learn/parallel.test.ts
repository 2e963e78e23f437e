import { describe, expect, it } from 'vitest';
import type { Dataset, ImageSample } from '../../src/core/sample.js';
import type { ModelName } from '../../src/learn/classifier.js';
import { formatMetricsJson, runEvaluation, serialUnitRunner } from '../../src/learn/evaluate.js';
import { learningWorkers } from '../../src/learn/parallel.js';
import { formatFoldsCsv, formatStudyPredictionsCsv } from '../../src/learn/study-files.js';
import { mnistDigits } from '../helpers/mnist.js';

/** `count` digits of MNIST in a fixed order (count / 10 of each digit; see test/helpers/mnist.ts). */
function digits(count: number): Dataset<ImageSample> {
  return mnistDigits(count / 10);
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
    // The out-of-fold predictions and fold scores evaluate writes beside metrics.json: the same bytes too.
    expect(formatStudyPredictionsCsv(threaded)).toBe(formatStudyPredictionsCsv(serial));
    expect(formatFoldsCsv(threaded)).toBe(formatFoldsCsv(serial));
    expect(serial.paired.length).toBeGreaterThan(0);
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
