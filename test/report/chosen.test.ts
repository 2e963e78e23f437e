import { describe, expect, it } from 'vitest';
import type { StudyResult } from '../../src/learn/evaluate.js';
import { choiceWords, chosenRows } from '../../src/report/chosen.js';

function result(
  features: string,
  folds: Array<{ repeat: number; fold: number; accuracy: number; chosen: Record<string, number | string> }>,
): StudyResult {
  return { features, model: 'pca-svm', folds } as unknown as StudyResult;
}

describe('chosenRows', () => {
  it('gives one row per distinct choice with the folds that made it and their accuracies', () => {
    const rows = chosenRows([
      result('landscape', [
        { repeat: 0, fold: 0, accuracy: 0.9, chosen: { depth: 3, gridSize: 20, C: 1, kernel: 'linear' } },
        {
          repeat: 0,
          fold: 1,
          accuracy: 0.8,
          chosen: { depth: 5, gridSize: 20, C: 10, gamma: 1 / 120, kernel: 'rbf' },
        },
        { repeat: 0, fold: 2, accuracy: 1, chosen: { depth: 3, gridSize: 20, C: 1, kernel: 'linear' } },
      ]),
      result('raw', [
        { repeat: 0, fold: 0, accuracy: 0.5, chosen: {} },
        { repeat: 1, fold: 0, accuracy: 0.6, chosen: {} },
      ]),
    ]);
    expect(rows).toEqual([
      {
        features: 'landscape',
        model: 'pca-svm',
        choice: 'depth 3 · grid 20 · C 1 · kernel linear',
        folds: ['1', '3'],
        accuracies: [0.9, 1],
      },
      {
        features: 'landscape',
        model: 'pca-svm',
        choice: 'depth 5 · grid 20 · C 10 · γ 0.00833 · kernel rbf',
        folds: ['2'],
        accuracies: [0.8],
      },
      // Two repeats: folds are named repeat.fold.
      {
        features: 'raw',
        model: 'pca-svm',
        choice: 'defaults (nothing searched)',
        folds: ['1.1', '2.1'],
        accuracies: [0.5, 0.6],
      },
    ]);
    expect(choiceWords({ varianceKept: 0.95 })).toBe('variance kept 0.95');
  });
});
