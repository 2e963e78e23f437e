import { describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { pairwiseDistances } from '../../src/homology/metric.js';
import { enclosingRadius, ripsPersistence, sortEdges } from '../../src/homology/rips.js';
import { condensedIndex } from '../../src/homology/simplex-index.js';
import { naiveRips } from './naive-reduction.js';
import { spherePoints } from './sphere-points.js';

function finiteOf(d: Diagram): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < d.births.length; i++)
    if (d.deaths[i] !== Infinity) out.push([d.births[i], d.deaths[i]]);
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}
function essentialOf(d: Diagram): number {
  let c = 0;
  for (let i = 0; i < d.deaths.length; i++) if (d.deaths[i] === Infinity) c++;
  return c;
}

/**
 * Checks the engines against the naive reduction, degree by degree, pair for pair, with and without the edge
 * collapse (edge-collapse.ts): the collapsed filtration must give the same diagrams. Both engines are checked:
 * the WebAssembly kernel (rips-kernel.ts) and the TypeScript one, in degrees 0–2 and in degrees 0–1 alone.
 */
function agree(
  coords: Float64Array,
  count: number,
  dim: number,
  maxDegree: 0 | 1 | 2,
  extra: { maxScale?: number; vertexValues?: number[] } = {},
): void {
  const edges = pairwiseDistances(coords, count, dim, 'euclidean');
  const want = naiveRips(count, (i, j) => edges[condensedIndex(i, j, count)], maxDegree, extra);
  // Without the collapse (TypeScript engine), with it on the WebAssembly kernel (the default), and with it on
  // the TypeScript engine.
  for (const [collapse, kernel] of [
    [false, false],
    [true, true],
    [true, false],
  ]) {
    const got = ripsPersistence(count, edges, {
      maxDegree,
      maxScale: extra.maxScale,
      vertexValues: extra.vertexValues ? Float64Array.from(extra.vertexValues) : undefined,
      collapse,
      kernel,
    });
    expect(got.length).toBe(maxDegree + 1);
    for (let d = 0; d <= maxDegree; d++) {
      expect(got[d].degree).toBe(d);
      expect(finiteOf(got[d])).toEqual(want.finite[d]);
      expect(essentialOf(got[d])).toBe(want.essential[d]);
    }
  }
  for (const kernel of [true, false]) {
    const low = ripsPersistence(count, edges, {
      maxDegree: maxDegree === 0 ? 0 : 1,
      maxScale: extra.maxScale,
      vertexValues: extra.vertexValues ? Float64Array.from(extra.vertexValues) : undefined,
      kernel,
    });
    for (let d = 0; d < low.length; d++) {
      expect(finiteOf(low[d])).toEqual(want.finite[d]);
      expect(essentialOf(low[d])).toBe(want.essential[d]);
    }
  }
}

function cloud(rng: Random, count: number, dim: number): Float64Array {
  const c = new Float64Array(count * dim);
  for (let i = 0; i < c.length; i++) c[i] = rng.uniform(-1, 1);
  return c;
}

// Reference: the standard column reduction over Z/2 (Edelsbrunner & Harer, "Computational Topology", 2010),
// implemented independently in naive-reduction.ts.
describe('ripsPersistence against the naive reduction', () => {
  it('agrees on random small clouds in 2 to 4 dimensions, degrees 0–2', () => {
    const rng = new Random(20260101);
    for (let trial = 0; trial < 60; trial++) {
      const dim = 2 + (trial % 3);
      const count = 5 + rng.int(6);
      agree(cloud(rng, count, dim), count, dim, 2);
    }
  });

  it('agrees on few points near the sphere, where H2 pairs occur', () => {
    const rng = new Random(11);
    let h2 = 0;
    for (let trial = 0; trial < 20; trial++) {
      const count = 8 + rng.int(5);
      const c = spherePoints(rng, count);
      agree(c, count, 3, 2);
      const edges = pairwiseDistances(c, count, 3);
      h2 += ripsPersistence(count, edges, { maxDegree: 2 })[2].births.length;
    }
    expect(h2).toBeGreaterThan(3); // the comparison above did exercise degree 2
  });

  it('agrees with a maximum scale, where classes alive at the cut are essential', () => {
    const rng = new Random(7);
    for (let trial = 0; trial < 30; trial++) {
      const count = 6 + rng.int(5);
      agree(cloud(rng, count, 2), count, 2, 2, { maxScale: 0.4 + rng.uniform(0, 0.8) });
    }
  });

  it('agrees on lattice points with many tied distances', () => {
    const grid2: number[] = [];
    for (let x = 0; x < 3; x++) for (let y = 0; y < 3; y++) grid2.push(x, y);
    agree(Float64Array.from(grid2), 9, 2, 2);
    const grid3: number[] = [];
    for (let x = 0; x < 2; x++) for (let y = 0; y < 2; y++) for (let z = 0; z < 3; z++) grid3.push(x, y, z);
    agree(Float64Array.from(grid3), 12, 3, 2);
    const ring: number[] = [];
    for (let x = 0; x < 4; x++)
      for (let y = 0; y < 4; y++) if (x === 0 || y === 0 || x === 3 || y === 3) ring.push(x, y);
    agree(Float64Array.from(ring), 12, 2, 2);
  });

  it('agrees with duplicate points', () => {
    const rng = new Random(99);
    for (let trial = 0; trial < 20; trial++) {
      const base = cloud(rng, 5, 3);
      const count = 9;
      const c = new Float64Array(count * 3);
      c.set(base);
      for (let k = 5; k < count; k++) for (let d = 0; d < 3; d++) c[k * 3 + d] = base[rng.int(5) * 3 + d];
      agree(c, count, 3, 2);
    }
  });

  it('agrees when vertices carry their own filtration values', () => {
    const rng = new Random(5);
    for (let trial = 0; trial < 25; trial++) {
      const count = 6 + rng.int(4);
      const vv = Array.from({ length: count }, () => rng.uniform(0, 0.6));
      agree(cloud(rng, count, 2), count, 2, 2, { vertexValues: vv });
    }
  });

  it('agrees on a larger cloud in degree 1', () => {
    const rng = new Random(31);
    agree(cloud(rng, 30, 2), 30, 2, 1);
  });
});

describe('sortEdges', () => {
  function reference(values: Float64Array, threshold: number): number[] {
    const idx = Array.from(values.keys()).filter((e) => values[e] <= threshold);
    return idx.sort((a, b) => values[a] - values[b] || b - a);
  }
  it('orders by value, ties by decreasing index, including values that share their high bits', () => {
    const rng = new Random(12);
    const wide = Float64Array.from({ length: 3000 }, () => rng.int(50) / 7);
    expect(Array.from(sortEdges(wide, 5).order)).toEqual(reference(wide, 5));
    // Values within 1e-9 of each other agree on their high 32 bits: the four-pass path is taken.
    const narrow = Float64Array.from({ length: 3000 }, () => 1 + rng.next() * 1e-9);
    expect(Array.from(sortEdges(narrow, 2).order)).toEqual(reference(narrow, 2));
    const zeros = Float64Array.from([0, -0, 0, 1]);
    expect(Array.from(sortEdges(zeros, 1).order)).toEqual([2, 1, 0, 3]);
  });
});

describe('ripsPersistence basics', () => {
  it('computes the enclosing radius as min over points of the largest distance', () => {
    // Three collinear points 0, 1, 3: the middle point is at most 2 away from the others.
    const edges = pairwiseDistances(Float64Array.from([0, 1, 3]), 3, 1);
    expect(enclosingRadius(3, edges)).toBe(2);
  });

  it('handles one point and no points', () => {
    expect(ripsPersistence(1, new Float64Array(0), { maxDegree: 1 })[0].deaths[0]).toBe(Infinity);
    const none = ripsPersistence(0, new Float64Array(0), { maxDegree: 2 });
    expect(none.map((d) => d.births.length)).toEqual([0, 0, 0]);
  });

  it('refuses a complex that would not fit in the memory limit, naming --max-scale', () => {
    const rng = new Random(3);
    const c = cloud(rng, 200, 3);
    expect(() =>
      ripsPersistence(200, pairwiseDistances(c, 200, 3), { maxDegree: 2, memoryLimit: 1e6 }),
    ).toThrow(/--max-scale/);
    expect(() =>
      ripsPersistence(200, pairwiseDistances(c, 200, 3), { maxDegree: 1, memoryLimit: 1e5 }),
    ).toThrow(/200 points up to scale .* edges, needing about/);
    // A scale cut small enough brings the same cloud within the limit.
    expect(
      ripsPersistence(200, pairwiseDistances(c, 200, 3), {
        maxDegree: 1,
        maxScale: 0.05,
        memoryLimit: 4e5,
      })[0].births.length,
    ).toBeGreaterThan(0);
  });
});

function longBars(d: Diagram, minimum: number): number {
  let c = 0;
  for (let i = 0; i < d.births.length; i++) if (d.deaths[i] - d.births[i] > minimum) c++;
  return c;
}

function circlePoints(count: number, radius: number, cx = 0, cy = 0): number[] {
  const out: number[] = [];
  for (let i = 0; i < count; i++) {
    const a = (2 * Math.PI * i) / count;
    out.push(cx + radius * Math.cos(a), cy + radius * Math.sin(a));
  }
  return out;
}

// Betti numbers of the sampled spaces, read off the long bars (textbook facts: circle b0 = b1 = 1; two
// disjoint circles b0 = b1 = 2; the sphere S² b1 = 0, b2 = 1; the torus b1 = 2, b2 = 1 — e.g. Hatcher,
// "Algebraic Topology", 2002, chapter 2).
describe('ripsPersistence recovers Betti numbers from long bars', () => {
  it('circle and two circles', () => {
    const rng = new Random(4);
    const one = circlePoints(50, 1).map((v) => v + rng.uniform(-0.02, 0.02));
    const [h0, h1] = ripsPersistence(50, pairwiseDistances(Float64Array.from(one), 50, 2), { maxDegree: 1 });
    expect(longBars(h0, 0.5)).toBe(1);
    expect(longBars(h1, 0.5)).toBe(1);
    const two = [...circlePoints(40, 1), ...circlePoints(40, 1, 5, 0)];
    const [g0, g1] = ripsPersistence(80, pairwiseDistances(Float64Array.from(two), 80, 2), { maxDegree: 1 });
    expect(longBars(g0, 0.5)).toBe(2);
    expect(longBars(g1, 0.5)).toBe(2);
  });

  it('sphere S²: one long H2 bar and no long H1 bar', () => {
    // Fibonacci points on the unit sphere (an even spread, deterministic).
    const count = 120;
    const c = new Float64Array(count * 3);
    const golden = Math.PI * (3 - Math.sqrt(5));
    for (let i = 0; i < count; i++) {
      const z = 1 - (2 * (i + 0.5)) / count;
      const r = Math.sqrt(1 - z * z);
      c[3 * i] = r * Math.cos(golden * i);
      c[3 * i + 1] = r * Math.sin(golden * i);
      c[3 * i + 2] = z;
    }
    const [, h1, h2] = ripsPersistence(count, pairwiseDistances(c, count, 3), { maxDegree: 2 });
    expect(longBars(h2, 0.4)).toBe(1);
    expect(longBars(h1, 0.4)).toBe(0);
  });

  it('torus: two long H1 bars and one long H2 bar', () => {
    // The flat (Clifford) torus in R⁴, (cos a, sin a, cos b, sin b), on a 14 × 14 grid of angles.
    const m = 14;
    const count = m * m;
    const c = new Float64Array(count * 4);
    for (let p = 0; p < m; p++)
      for (let q = 0; q < m; q++) {
        const a = (2 * Math.PI * p) / m;
        const b = (2 * Math.PI * q) / m;
        c.set([Math.cos(a), Math.sin(a), Math.cos(b), Math.sin(b)], 4 * (p * m + q));
      }
    const [, h1, h2] = ripsPersistence(count, pairwiseDistances(c, count, 4), { maxDegree: 2 });
    expect(longBars(h1, 0.3)).toBe(2);
    expect(longBars(h2, 0.15)).toBe(1);
  });
});

// Adamaszek & Adams, "The Vietoris–Rips complexes of a circle", 2017, and Adamaszek, "Clique complexes and
// graph powers", 2013: for n equally spaced points, the complex at scale of the k-th chord is the clique
// complex of the k-th power of the n-cycle, ≃ S¹ for 0 < k/n < 1/3, and for k/n = 1/3 a wedge of n/3 − 1
// two-spheres, ≃ S³ for 1/3 < k/n < 2/5. With chords c_k = 2R·sin(πk/n): one H1 bar [c_1, c_⌈n/3⌉); for n
// divisible by 3 (n ≥ 6), n/3 − 1 H2 bars born at c_{n/3} that die at c_{n/3+1}.
describe('ripsPersistence on the regular n-gon', () => {
  for (const n of [5, 6, 7, 8, 9, 12]) {
    it(`n = ${n}`, () => {
      const R = 1.5;
      const c = Float64Array.from(circlePoints(n, R));
      const [, h1, h2] = ripsPersistence(n, pairwiseDistances(c, n, 2), { maxDegree: 2 });
      const chord = (k: number): number => 2 * R * Math.sin((Math.PI * k) / n);
      const bars1 = finiteOf(h1).filter(([b, d]) => d - b > 1e-9);
      expect(bars1.length).toBe(1);
      expect(bars1[0][0]).toBeCloseTo(chord(1), 9);
      expect(bars1[0][1]).toBeCloseTo(chord(Math.ceil(n / 3)), 9);
      const bars2 = finiteOf(h2).filter(([b, d]) => d - b > 1e-9);
      if (n % 3 === 0) {
        expect(bars2.length).toBe(n / 3 - 1);
        for (const [b, d] of bars2) {
          expect(b).toBeCloseTo(chord(n / 3), 9);
          expect(d).toBeCloseTo(chord(n / 3 + 1), 9);
        }
      } else {
        expect(bars2.length).toBe(0);
      }
    });
  }
});

// Stability: moving every point by at most δ changes every distance, hence every simplex value, by at most
// 2δ, so each diagram moves by at most 2δ in bottleneck distance (Cohen-Steiner, Edelsbrunner, Harer,
// "Stability of persistence diagrams", 2007; Chazal, de Silva, Oudot, "Persistence stability for geometric
// complexes", 2014).
describe('ripsPersistence is stable', () => {
  it('moves each diagram by at most 2δ when points move by at most δ', async () => {
    const { bottleneckDistance } = await import('../../src/homology/distance.js');
    const rng = new Random(77);
    for (let trial = 0; trial < 8; trial++) {
      const count = 25;
      const base = cloud(rng, count, 2);
      const delta = 0.01 + 0.05 * rng.next();
      const moved = base.slice();
      for (let i = 0; i < count; i++) {
        const a = rng.uniform(0, 2 * Math.PI);
        const r = delta * Math.sqrt(rng.next());
        moved[2 * i] += r * Math.cos(a);
        moved[2 * i + 1] += r * Math.sin(a);
      }
      const da = ripsPersistence(count, pairwiseDistances(base, count, 2), { maxDegree: 2 });
      const db = ripsPersistence(count, pairwiseDistances(moved, count, 2), { maxDegree: 2 });
      for (let d = 0; d <= 2; d++)
        expect(bottleneckDistance(da[d], db[d])).toBeLessThanOrEqual(2 * delta + 1e-12);
    }
  });
});
