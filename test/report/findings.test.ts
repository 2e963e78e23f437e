import { describe, expect, it } from 'vitest';
import { correctedResampledInterval, PAIRED_LEVEL } from '../../src/learn/paired.js';
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

  it('lets the paired interval decide: a large mean gap whose interval holds zero is not called a gain', () => {
    // Five folds, n_test/n_train = 1/4, the corrected resampled t interval (Nadeau & Bengio, "Inference for the
    // Generalization Error", Machine Learning 2003) computed by the library itself.
    const paired = (differences: number[]) => {
      const ci = correctedResampledInterval(differences, 1 / 4);
      return {
        features: 'landscape',
        baseline: 'raw',
        model: 'pca-svm',
        pairs: differences.length,
        differences,
        ...ci,
        level: PAIRED_LEVEL,
      };
    };
    const withPair = (land: number, raw: number, differences: number[]) =>
      ({
        results: [result('landscape', land), result('raw', raw)],
        paired: [paired(differences)],
      }) as never;
    const steady = paired([0.14, 0.16, 0.15, 0.15, 0.15]);
    expect(steady.lower).toBeGreaterThan(0);
    expect(findingsOf(withPair(0.95, 0.8, steady.differences), [])[0]).toMatch(
      /^Shape helps here: .* paired difference over the same 5 folds is \+15 points \[\+\d+, \+\d+\] \(95% interval\), which excludes zero\.$/,
    );
    // The same mean gap, but the folds disagree: without the interval this read "Shape helps here".
    const noisy = paired([0.6, -0.3, 0.5, -0.2, 0.15]);
    expect(noisy.lower).toBeLessThan(0);
    expect(findingsOf(evaluation(0.95, 0.8), [])[0]).toMatch(/^Shape helps here/);
    expect(findingsOf(withPair(0.95, 0.8, noisy.differences), [])[0]).toMatch(
      /^Landscape features are somewhat ahead: .* which includes zero: treat the gain as unproven\.$/,
    );
    const worse = paired([-0.2, -0.22, -0.18, -0.2, -0.2]);
    expect(findingsOf(withPair(0.6, 0.8, worse.differences), [])[0]).toMatch(
      /^The raw baseline wins on this set: .* −20 points .* which excludes zero\./,
    );
  });
});
