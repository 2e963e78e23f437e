import { describe, expect, it } from 'vitest';
import { Random } from '../../../src/core/random.js';
import { drawShape, drawSphere } from '../../../src/demo/scenarios/shapes.js';

describe('drawSphere', () => {
  it('puts points near the unit sphere, spread over it, the same for the same seed', () => {
    const n = 2000;
    const c = drawSphere(n, 0.02, new Random(5));
    const mean = [0, 0, 0];
    for (let i = 0; i < n; i++) {
      const r = Math.hypot(c[3 * i], c[3 * i + 1], c[3 * i + 2]);
      // Jitter of 0.02 per coordinate: the radius stays within 5 standard deviations of 1 (common practice, no source).
      expect(Math.abs(r - 1)).toBeLessThan(0.02 * 5 * Math.sqrt(3));
      for (let d = 0; d < 3; d++) mean[d] += c[3 * i + d] / n;
    }
    // Uniform directions: each coordinate has variance 1/3, so its mean over n points has standard deviation
    // 1/sqrt(3n) ≈ 0.013; 0.06 is more than 4 of them (common practice, no source).
    for (const m of mean) expect(Math.abs(m)).toBeLessThan(0.06);
    expect(drawSphere(n, 0.02, new Random(5))).toEqual(c);
    expect(drawSphere(n, 0.02, new Random(6))).not.toEqual(c);
  });
});

describe('drawShape', () => {
  it('draws a unit loop within the jitter of radius 1', () => {
    const c = drawShape('loop', 500, 0.01, new Random(2));
    for (let i = 0; i < 500; i++) expect(Math.abs(Math.hypot(c[2 * i], c[2 * i + 1]) - 1)).toBeLessThan(0.08);
  });
});
