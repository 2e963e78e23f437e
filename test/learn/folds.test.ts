import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { checkFoldable, encodeLabels, stratifiedFolds } from '../../src/learn/folds.js';

// Stratified k-fold as described by Kohavi, "A study of cross-validation and bootstrap for accuracy
// estimation and model selection", 1995: folds partition the samples and keep each class's proportion.
function labels(counts: number[]): Int32Array {
  const out: number[] = [];
  counts.forEach((c, k) => {
    for (let i = 0; i < c; i++) out.push(k);
  });
  return Int32Array.from(out);
}

describe('stratifiedFolds', () => {
  const y = labels([23, 17, 10]);

  it('partitions the samples: test folds are disjoint, cover every sample once, train is the rest', () => {
    const folds = stratifiedFolds(y, 3, { folds: 5, seed: 7 });
    expect(folds).toHaveLength(5);
    const seen = new Int32Array(y.length);
    for (const f of folds) {
      for (const i of f.test) seen[i]++;
      expect(f.train.length + f.test.length).toBe(y.length);
      const inTest = new Set(f.test);
      for (const i of f.train) expect(inTest.has(i)).toBe(false);
    }
    expect([...seen].every((c) => c === 1)).toBe(true);
  });

  it('keeps each class within one sample of its share in every fold', () => {
    const folds = stratifiedFolds(y, 3, { folds: 5, seed: 3 });
    for (const f of folds) {
      const counts = [0, 0, 0];
      for (const i of f.test) counts[y[i]]++;
      expect(Math.abs(counts[0] - 23 / 5)).toBeLessThan(1);
      expect(Math.abs(counts[1] - 17 / 5)).toBeLessThan(1);
      expect(counts[2]).toBe(2);
    }
    const sizes = folds.map((f) => f.test.length);
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
  });

  it('is repeatable by seed and differs across seeds and repeats', () => {
    const a = stratifiedFolds(y, 3, { folds: 4, repeats: 2, seed: 11 });
    const b = stratifiedFolds(y, 3, { folds: 4, repeats: 2, seed: 11 });
    const c = stratifiedFolds(y, 3, { folds: 4, repeats: 2, seed: 12 });
    expect(a.map((f) => [...f.test])).toEqual(b.map((f) => [...f.test]));
    expect(a.map((f) => [...f.test])).not.toEqual(c.map((f) => [...f.test]));
    expect(a).toHaveLength(8);
    expect([...a[0].test]).not.toEqual([...a[4].test]);
    expect(a[5].repeat).toBe(1);
    expect(a[5].fold).toBe(1);
  });
});

describe('checkFoldable', () => {
  it('refuses one class, naming what to change', () => {
    expect(() => checkFoldable(new Int32Array(6), ['ok'], 3)).toThrow(
      /only one class \('ok'\).*at least two classes/,
    );
  });
  it('refuses a class smaller than the folds and suggests a fold count', () => {
    const y = encodeLabels(['a', 'a', 'a', 'a', 'a', 'b', 'b', 'b'], ['a', 'b']);
    expect(() => checkFoldable(y, ['a', 'b'], 5)).toThrow(UserError);
    expect(() => checkFoldable(y, ['a', 'b'], 5)).toThrow(
      "class 'b' has 3 samples, fewer than the 5 folds asked for; use --folds 3 or fewer",
    );
    expect(() => checkFoldable(y, ['a', 'b'], 3)).not.toThrow();
  });
});
