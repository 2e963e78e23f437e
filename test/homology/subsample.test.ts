import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import type { PointSample } from '../../src/core/sample.js';
import { alphaPersistence } from '../../src/homology/alpha.js';
import { bottleneckDistance } from '../../src/homology/distance.js';
import { pairwiseDistances } from '../../src/homology/metric.js';
import { ripsPersistence } from '../../src/homology/rips.js';
import {
  coveringRadius,
  maxminLandmarks,
  maxminLandmarksFromMatrix,
  parseSubsample,
  randomIndices,
  selectLandmarks,
  subsampleSample,
} from '../../src/homology/subsample.js';

function noisyCircle(seed: number, n: number): Float64Array {
  const r = new Random(seed);
  const c = new Float64Array(2 * n);
  for (let i = 0; i < n; i++) {
    const a = r.uniform(0, 2 * Math.PI);
    c[2 * i] = Math.cos(a) + r.normal(0, 0.05);
    c[2 * i + 1] = Math.sin(a) + r.normal(0, 0.05);
  }
  return c;
}

function cut(c: Float64Array, dim: number, idx: Int32Array): Float64Array {
  const out = new Float64Array(idx.length * dim);
  for (let l = 0; l < idx.length; l++) for (let a = 0; a < dim; a++) out[l * dim + a] = c[idx[l] * dim + a];
  return out;
}

function cloud(seed: number, count: number, dim: number): Float64Array {
  const r = new Random(seed);
  return Float64Array.from({ length: count * dim }, () => r.uniform(0, 1));
}

function minPairwise(c: Float64Array, dim: number, idx: Int32Array): number {
  let best = Infinity;
  for (let a = 0; a < idx.length; a++) {
    for (let b = a + 1; b < idx.length; b++) {
      let s = 0;
      for (let k = 0; k < dim; k++) s += (c[idx[a] * dim + k] - c[idx[b] * dim + k]) ** 2;
      best = Math.min(best, Math.sqrt(s));
    }
  }
  return best;
}

describe('maxmin landmarks', () => {
  it('pick the farthest point each time on a hand-worked line', () => {
    // 0, 1, …, 10 starting from the point the seed draws; the next is the far end, then the middle.
    const x = Float64Array.from({ length: 11 }, (_, i) => i);
    const first = new Random(1).int(11);
    const l = maxminLandmarks(x, 11, 1, 3, 1);
    expect(l.indices[0]).toBe(first);
    const far = first < 5 ? 10 : 0; // ties (first = 5) go to the lower index
    expect(l.indices[1]).toBe(far);
    // The covering radius is the largest remaining gap to the three landmarks.
    expect(l.coveringRadius).toBe(coveringRadius(x, 11, 1, l.indices));
  });

  it('report the covering radius computed directly, and keep landmarks at least ε apart', () => {
    // Farthest-point selection: every landmark was ≥ ε from the earlier ones, so landmarks are ε-separated
    // and ε-covering (Gonzalez, "Clustering to minimize the maximum intercluster distance", 1985).
    for (const dim of [2, 3]) {
      const c = cloud(dim, 2000, dim);
      const l = maxminLandmarks(c, 2000, dim, 60, 4);
      expect(l.indices.length).toBe(60);
      expect(new Set(l.indices).size).toBe(60);
      expect(l.coveringRadius).toBeCloseTo(coveringRadius(c, 2000, dim, l.indices), 12);
      expect(minPairwise(c, dim, l.indices)).toBeGreaterThanOrEqual(l.coveringRadius - 1e-12);
    }
  });

  it('cover better than a random draw of the same size', () => {
    // Common practice, no source: farthest-point landmarks cover a uniform cloud more tightly than random ones.
    const c = cloud(9, 3000, 2);
    const maxmin = selectLandmarks(c, 3000, 2, { method: 'maxmin', count: 100, seed: 2 });
    const random = selectLandmarks(c, 3000, 2, { method: 'random', count: 100, seed: 2 });
    expect(maxmin.coveringRadius).toBeLessThan(random.coveringRadius);
  });

  it('agree between a cloud and its distance matrix', () => {
    const n = 80;
    const c = cloud(3, n, 2);
    const m = new Float64Array(n * n);
    for (let i = 0; i < n; i++)
      for (let j = 0; j < n; j++) m[i * n + j] = Math.hypot(c[2 * i] - c[2 * j], c[2 * i + 1] - c[2 * j + 1]);
    const a = maxminLandmarks(c, n, 2, 12, 5);
    const b = maxminLandmarksFromMatrix(m, n, 12, 5);
    expect(Array.from(b.indices)).toEqual(Array.from(a.indices));
    expect(b.coveringRadius).toBeCloseTo(a.coveringRadius, 12);
  });

  it('keep every point, with radius 0, when asked for more than there are', () => {
    const l = maxminLandmarks(cloud(1, 5, 2), 5, 2, 10);
    expect(l.indices.length).toBe(5);
    expect(l.coveringRadius).toBe(0);
  });
});

describe('random landmarks', () => {
  it('are distinct, sorted and the same for the same seed', () => {
    const a = randomIndices(1000, 50, 7);
    expect(new Set(a).size).toBe(50);
    expect(Array.from(a)).toEqual(Array.from(a).sort((x, y) => x - y));
    expect(Array.from(randomIndices(1000, 50, 7))).toEqual(Array.from(a));
    expect(Array.from(randomIndices(1000, 50, 8))).not.toEqual(Array.from(a));
  });
});

describe('subsampling a sample', () => {
  it('cuts a point sample and a distance sample down to the landmarks', () => {
    const c = cloud(5, 100, 3);
    const sample: PointSample = { kind: 'points', id: 's', label: 'a', dim: 3, count: 100, coords: c };
    const { sample: cut, landmarks } = subsampleSample(sample, { method: 'maxmin', count: 10, seed: 1 });
    expect(cut.count).toBe(10);
    expect(Array.from(cut.coords.subarray(3, 6))).toEqual(
      Array.from(c.subarray(landmarks.indices[1] * 3, landmarks.indices[1] * 3 + 3)),
    );
    const m = new Float64Array(100 * 100);
    for (let i = 0; i < 100; i++) for (let j = 0; j < 100; j++) m[i * 100 + j] = Math.abs(i - j);
    const { sample: cutM } = subsampleSample(
      { kind: 'distances', id: 'd', label: 'a', size: 100, matrix: m },
      { method: 'random', count: 4, seed: 3 },
    );
    expect(cutM.size).toBe(4);
    expect(cutM.matrix[1]).toBeGreaterThan(0);
  });

  it('parses maxmin:N[:SEED] and random:N[:SEED]', () => {
    expect(parseSubsample('maxmin:500')).toEqual({ method: 'maxmin', count: 500, seed: 1 });
    expect(parseSubsample('random:20:9')).toEqual({ method: 'random', count: 20, seed: 9 });
    expect(parseSubsample('maxmin:0')).toBeUndefined();
    expect(parseSubsample('grid:5')).toBeUndefined();
    expect(parseSubsample('maxmin:abc')).toBeUndefined();
  });
});

describe('stability of landmark diagrams', () => {
  it('keep the Rips diagrams within 2ε in bottleneck distance', () => {
    // Landmarks L ⊂ X with covering radius ε are within Gromov–Hausdorff distance ε, so the Rips diagrams
    // (on distances) are within 2ε in bottleneck distance (Chazal, de Silva & Oudot, "Persistence stability
    // for geometric complexes", 2014, Thm 5.2).
    for (const method of ['maxmin', 'random'] as const) {
      const n = 180;
      const c = noisyCircle(method === 'maxmin' ? 2 : 3, n);
      const l = selectLandmarks(c, n, 2, { method, count: 40, seed: 5 });
      const sub = cut(c, 2, l.indices);
      const full = ripsPersistence(n, pairwiseDistances(c, n, 2), { maxDegree: 1 });
      const small = ripsPersistence(40, pairwiseDistances(sub, 40, 2), { maxDegree: 1 });
      for (const d of [0, 1]) {
        const b = bottleneckDistance(full[d], small[d]);
        expect(b).toBeLessThanOrEqual(2 * l.coveringRadius + 1e-12);
      }
      // The circle's loop survives subsampling.
      expect(Math.max(...Array.from(small[1].deaths).map((x, i) => x - small[1].births[i]))).toBeGreaterThan(
        1,
      );
    }
  });

  it('keep the alpha (Čech) diagrams within ε in bottleneck distance', () => {
    // On radii the Čech filtrations of X and L are ε-interleaved (union of balls; Cohen-Steiner, Edelsbrunner
    // & Harer, "Stability of persistence diagrams", 2007; nerve theorem for alpha = Čech).
    const n = 800;
    const c = noisyCircle(4, n);
    const l = maxminLandmarks(c, n, 2, 80, 2);
    const full = alphaPersistence(c, n);
    const small = alphaPersistence(cut(c, 2, l.indices), 80);
    for (const d of [0, 1])
      expect(bottleneckDistance(full[d], small[d])).toBeLessThanOrEqual(l.coveringRadius + 1e-12);
  });
});
