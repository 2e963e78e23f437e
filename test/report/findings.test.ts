import { describe, expect, it } from 'vitest';
import { findingsOf } from '../../src/report/findings.js';

describe('findingsOf', () => {
  const summary = (mean: number, std: number) => ({ mean, std, values: [] as number[] });
  const result = (features: string, mean: number, std = 0.05) =>
    ({
      features,
      model: 'pca-svm',
      accuracy: summary(mean, std),
      balancedAccuracy: summary(mean, std),
      macroF1: summary(mean, std),
      folds: [],
    }) as never;
  const evaluation = (land: number, raw: number) =>
    ({ results: [result('landscape', land), result('raw', raw)] }) as never;
  it('says plainly when the raw baseline wins and when shape clearly helps', () => {
    expect(findingsOf(evaluation(0.6, 0.8), [])[0]).toMatch(/^The raw baseline wins on this set/);
    expect(findingsOf(evaluation(0.95, 0.6), [])[0]).toMatch(/^Shape helps here/);
    expect(findingsOf(evaluation(0.81, 0.8), [])[0]).toMatch(/^No gain from shape/);
  });
  it('speaks of the best feature set built from diagrams, whichever vectoriser it is', () => {
    const mixed = {
      results: [result('landscape', 0.7), result('betti', 0.9), result('stats', 0.8), result('raw', 0.6)],
    } as never;
    expect(findingsOf(mixed, [])[0]).toMatch(/^Shape helps here: Betti-curve features \(pca-svm\) reach 90%/);
    const only = { results: [result('stats', 0.75)] } as never;
    expect(findingsOf(only, [])[0]).toBe('Persistence statistics (pca-svm) reach 75% ± 5%.');
  });
});
