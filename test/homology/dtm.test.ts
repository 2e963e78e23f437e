import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { dtmEdgeValue, dtmEdgeValues, dtmProblem, dtmValues, dtmValuesFromMatrix } from '../../src/homology/dtm.js';

/** The empirical DTM by its definition (Anai et al., "DTM-based filtrations", 2019, §2): m = k/n, self included. */
function dtmByDefinition(c: ArrayLike<number>, n: number, dim: number, k: number): number[] {
  const out: number[] = [];
  for (let i = 0; i < n; i++) {
    const d: number[] = [];
    for (let j = 0; j < n; j++) {
      let s = 0;
      for (let a = 0; a < dim; a++) s += (c[i * dim + a] - c[j * dim + a]) ** 2;
      d.push(s);
    }
    d.sort((a, b) => a - b);
    out.push(Math.sqrt(d.slice(0, k).reduce((a, b) => a + b, 0) / k));
  }
  return out;
}

describe('DTM values', () => {
  it('match a hand-worked example on a line', () => {
    // Points 0, 1, 3, 7 with K = 2 (self and the nearest other): f = |gap to nearest| / √2.
    const f = dtmValues([0, 1, 3, 7], 4, 1, 2);
    const expected = [Math.sqrt(1 / 2), Math.sqrt(1 / 2), Math.sqrt(4 / 2), Math.sqrt(16 / 2)];
    for (let i = 0; i < 4; i++) expect(f[i]).toBeCloseTo(expected[i], 15);
    // K = 3 at the point 3: neighbours 3, 1, 0 → sqrt((0 + 4 + 9) / 3).
    expect(dtmValues([0, 1, 3, 7], 4, 1, 3)[2]).toBeCloseTo(Math.sqrt(13 / 3), 15);
  });

  it('are 0 for K = 1 (the point itself) and grow with K', () => {
    const r = new Random(3);
    const c = Float64Array.from({ length: 60 }, () => r.normal());
    expect(Array.from(dtmValues(c, 30, 2, 1)).every((v) => v === 0)).toBe(true);
    const f5 = dtmValues(c, 30, 2, 5);
    const f10 = dtmValues(c, 30, 2, 10);
    for (let i = 0; i < 30; i++) expect(f10[i]).toBeGreaterThanOrEqual(f5[i]);
  });

  it('match the definition computed directly in R³', () => {
    const r = new Random(11);
    const n = 200;
    const c = Float64Array.from({ length: 3 * n }, () => r.uniform(-1, 1));
    const expected = dtmByDefinition(c, n, 3, 10);
    const got = dtmValues(c, n, 3, 10);
    for (let i = 0; i < n; i++) expect(got[i]).toBeCloseTo(expected[i], 12);
  });

  it('from a distance matrix equal those from the cloud', () => {
    const r = new Random(5);
    const n = 40;
    const c = Float64Array.from({ length: 2 * n }, () => r.normal());
    const m = new Float64Array(n * n);
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) m[i * n + j] = Math.hypot(c[2 * i] - c[2 * j], c[2 * i + 1] - c[2 * j + 1]);
    const a = dtmValues(c, n, 2, 6);
    const b = dtmValuesFromMatrix(m, n, 6);
    for (let i = 0; i < n; i++) expect(b[i]).toBeCloseTo(a[i], 12);
  });

  it('lift an outlier far above the points of a dense cluster', () => {
    // Common practice, no source: this is why DTM resists outliers — an isolated point gets a large value.
    const r = new Random(8);
    const pts: number[] = [];
    for (let i = 0; i < 50; i++) pts.push(r.normal(0, 0.05), r.normal(0, 0.05));
    pts.push(3, 3);
    const f = dtmValues(pts, 51, 2, 5);
    expect(f[50]).toBeGreaterThan(20 * Math.max(...Array.from(f.subarray(0, 50))));
  });
});

describe('DTM edge values (p = 1)', () => {
  it('follow the two cases of the weighted Rips rule', () => {
    // Anai et al. 2019, Prop. 3.2 for p = 1: max(fx, fy) when d ≤ |fx − fy|, else (fx + fy + d)/2.
    expect(dtmEdgeValue(0, 0, 2)).toBe(1); // plain Rips on radii: half the length
    expect(dtmEdgeValue(1, 3, 1)).toBe(3); // d = 1 ≤ |1 − 3|: the larger ball already holds the other point
    expect(dtmEdgeValue(1, 3, 2)).toBe(3); // boundary case: both formulas give 3
    expect(dtmEdgeValue(1, 3, 4)).toBe(4); // (1 + 3 + 4)/2
    expect(dtmEdgeValue(0.5, 0.25, 1)).toBe(0.875);
  });

  it('match the case rule over all pairs of a random cloud, in the condensed order of the Rips engine', () => {
    const r = new Random(21);
    const n = 30;
    const c = Float64Array.from({ length: 2 * n }, () => r.normal());
    const f = dtmValues(c, n, 2, 4);
    const condensed: number[] = [];
    for (let j = 1; j < n; j++) for (let i = 0; i < j; i++) condensed.push(Math.hypot(c[2 * i] - c[2 * j], c[2 * i + 1] - c[2 * j + 1]));
    const edges = dtmEdgeValues(condensed, f);
    let e = 0;
    for (let j = 1; j < n; j++) {
      for (let i = 0; i < j; i++, e++) {
        const d = condensed[e];
        const expected = d <= Math.abs(f[i] - f[j]) ? Math.max(f[i], f[j]) : (f[i] + f[j] + d) / 2;
        expect(edges[e]).toBeCloseTo(expected, 14);
        expect(edges[e]).toBeGreaterThanOrEqual(Math.max(f[i], f[j]));
      }
    }
  });

  it('explain a bad K to the user', () => {
    expect(dtmProblem(0, 10)).toMatch(/K ≥ 1/);
    expect(dtmProblem(20, 10)).toMatch(/only 10 points.*K ≤ 10/);
    expect(dtmProblem(5, 10)).toBeUndefined();
  });
});
