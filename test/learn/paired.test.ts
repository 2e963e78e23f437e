import { describe, expect, it } from 'vitest';
import {
  correctedResampledInterval,
  incompleteBeta,
  logGamma,
  studentTCdf,
  studentTQuantile,
} from '../../src/learn/paired.js';

describe('Student t quantiles', () => {
  it('match the published table of critical values to its 3 decimals', () => {
    // NIST/SEMATECH e-Handbook of Statistical Methods, §1.3.6.7.2 "Critical values of the Student's t
    // distribution" (upper-tail probabilities 0.10, 0.05, 0.025, 0.005 → p = 0.90, 0.95, 0.975, 0.995).
    const table: Array<[number, number, number]> = [
      [0.975, 1, 12.706],
      [0.975, 2, 4.303],
      [0.975, 4, 2.776],
      [0.975, 9, 2.262],
      [0.975, 10, 2.228],
      [0.975, 20, 2.086],
      [0.975, 29, 2.045],
      [0.975, 30, 2.042],
      [0.975, 100, 1.984],
      [0.95, 4, 2.132],
      [0.95, 10, 1.812],
      [0.9, 5, 1.476],
      [0.995, 4, 4.604],
      [0.995, 9, 3.25],
    ];
    for (const [p, df, value] of table) {
      expect(Math.abs(studentTQuantile(p, df) - value)).toBeLessThan(5e-4 + 1e-12);
      expect(studentTQuantile(1 - p, df)).toBeCloseTo(-studentTQuantile(p, df), 12);
    }
  });

  it('equal the closed forms for 1 and 2 degrees of freedom', () => {
    // ν = 1 is the Cauchy distribution, F⁻¹(p) = tan(π(p − ½)); ν = 2 has F⁻¹(p) = (2p − 1)/√(2p(1 − p))
    // (Johnson, Kotz & Balakrishnan, "Continuous Univariate Distributions", vol. 2, 2nd ed., 1995, ch. 28).
    for (const p of [0.6, 0.75, 0.9, 0.975, 0.999]) {
      const cauchy = Math.tan(Math.PI * (p - 0.5));
      expect(Math.abs(studentTQuantile(p, 1) - cauchy) / cauchy).toBeLessThan(1e-10);
      const two = (2 * p - 1) / Math.sqrt(2 * p * (1 - p));
      expect(Math.abs(studentTQuantile(p, 2) - two) / two).toBeLessThan(1e-10);
    }
  });

  it('rests on ln Γ and the incomplete beta function of known values', () => {
    // Γ(½) = √π, Γ(10) = 9! = 362880, Γ(1) = Γ(2) = 1; I_x(1, 1) = x, I_x(a, 1) = x^a (from the definition).
    expect(logGamma(0.5)).toBeCloseTo(Math.log(Math.sqrt(Math.PI)), 13);
    expect(logGamma(10)).toBeCloseTo(Math.log(362880), 12);
    expect(logGamma(1)).toBeCloseTo(0, 13);
    expect(logGamma(2)).toBeCloseTo(0, 13);
    for (const x of [0.1, 0.5, 0.93]) {
      expect(incompleteBeta(1, 1, x)).toBeCloseTo(x, 13);
      expect(incompleteBeta(3, 1, x)).toBeCloseTo(x ** 3, 13);
    }
    expect(studentTCdf(0, 7)).toBe(0.5);
    expect(studentTCdf(1.5, 7) + studentTCdf(-1.5, 7)).toBeCloseTo(1, 14);
  });
});

describe('corrected resampled t interval (Nadeau & Bengio, "Inference for the Generalization Error", 2003)', () => {
  it('gives mean ± t · sqrt((1/J + n_test/n_train) · s²) on a case worked by hand', () => {
    // Five fold differences of 5-fold CV (n_test/n_train = 1/4): mean 0.1, s² = 0.02/4 = 0.005,
    // corrected variance (1/5 + 1/4) · 0.005 = 0.00225, se = 0.0474342; t(0.975, 4) = 2.776 (NIST table above)
    // → half width 0.13170.
    const r = correctedResampledInterval([0.1, 0, 0.2, 0.1, 0.1], 1 / 4, 0.95);
    expect(r.mean).toBeCloseTo(0.1, 14);
    expect(r.std).toBeCloseTo(Math.sqrt(0.005), 14);
    expect(r.se).toBeCloseTo(Math.sqrt(0.00225), 14);
    expect(r.df).toBe(4);
    expect(r.t).toBeCloseTo(2.776, 3);
    expect(r.lower).toBeCloseTo(0.1 - 0.1317, 4);
    expect(r.upper).toBeCloseTo(0.1 + 0.1317, 4);
  });

  it('is wider than the plain t interval by sqrt(1 + J · n_test/n_train)', () => {
    const d = [0.05, -0.02, 0.08, 0.01, 0.03, 0.04, -0.01, 0.06, 0.02, 0.0];
    const plain = correctedResampledInterval(d, 0);
    const corrected = correctedResampledInterval(d, 1 / 9);
    const ratio = (corrected.upper - corrected.lower) / (plain.upper - plain.lower);
    expect(ratio).toBeCloseTo(Math.sqrt(1 + 10 / 9), 12);
    expect(corrected.mean).toBe(plain.mean);
  });

  it('refuses fewer than two differences', () => {
    expect(() => correctedResampledInterval([0.1], 0.25)).toThrow(/2 or more/);
  });
});
