import { describe, expect, it } from 'vitest';
import { holmAdjust, holmRejects } from '../../src/report/holm.js';

describe('holmAdjust', () => {
  it('matches a hand-worked example of the step-down rule', () => {
    // Holm, "A simple sequentially rejective multiple test procedure", 1979: compare p(j) with α/(m − j + 1).
    // Worked by hand for p = (0.01, 0.04, 0.03, 0.005), m = 4:
    //   sorted 0.005 → 4·0.005 = 0.02;  0.01 → 3·0.01 = 0.03;  0.03 → 2·0.03 = 0.06;  0.04 → 1·0.04 = 0.04,
    //   raised to the running maximum 0.06. In input order: 0.03, 0.06, 0.06, 0.02.
    const adjusted = holmAdjust([0.01, 0.04, 0.03, 0.005]);
    expect(Array.from(adjusted)).toEqual([0.03, 0.06, 0.06, 0.02].map((v) => expect.closeTo(v, 12)));
    // At α = 0.05 the procedure rejects the two smallest (0.005 < 0.05/4, 0.01 < 0.05/3) and stops at
    // 0.03 > 0.05/2, so 0.04 is kept as well even though 0.04 < 0.05/1.
    expect(holmRejects([0.01, 0.04, 0.03, 0.005], 0.05)).toEqual([true, false, false, true]);
  });

  it('caps at 1 and never falls below the raw p-value', () => {
    // Holm 1979: adjusted values are min(1, ·) and monotone in the sorted order.
    const p = [0.2, 0.5, 0.9, 0.04, 0.3];
    const adjusted = holmAdjust(p);
    // By hand: sorted 0.04·5 = 0.2, 0.2·4 = 0.8, 0.3·3 = 0.9, 0.5·2 = 1 (capped), 0.9·1 → running max 1.
    expect(Array.from(adjusted)).toEqual([0.8, 1, 1, 0.2, 0.9].map((v) => expect.closeTo(v, 12)));
    for (let i = 0; i < p.length; i++) expect(adjusted[i]).toBeGreaterThanOrEqual(p[i]);
  });

  it('equals Bonferroni for the smallest p-value and leaves a single test unchanged', () => {
    // Holm 1979: the first step is the Bonferroni comparison p(1) · m.
    const adjusted = holmAdjust([0.3, 0.001, 0.7]);
    expect(adjusted[1]).toBeCloseTo(0.003, 12);
    expect(Array.from(holmAdjust([0.0123]))).toEqual([0.0123]);
  });

  it('refuses values outside [0, 1]', () => {
    expect(() => holmAdjust([0.1, 1.5])).toThrow(/not in \[0, 1\]/);
    expect(() => holmAdjust([Number.NaN])).toThrow(/not in \[0, 1\]/);
  });
});
