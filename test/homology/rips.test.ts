import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import type { Diagram } from '../../src/homology/diagram.js';
import { pairwiseDistances } from '../../src/homology/metric.js';
import { enclosingRadius, ripsPersistence, sortEdges } from '../../src/homology/rips.js';
import { condensedIndex } from '../../src/homology/simplex-index.js';
import { naiveRips } from './naive-reduction.js';

function finiteOf(d: Diagram): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < d.births.length; i++) if (d.deaths[i] !== Infinity) out.push([d.births[i], d.deaths[i]]);
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}
function essentialOf(d: Diagram): number {
  let c = 0;
  for (let i = 0; i < d.deaths.length; i++) if (d.deaths[i] === Infinity) c++;
  return c;
}

/** Checks the engine against the naive reduction, degree by degree, pair for pair. */
function agree(coords: Float64Array, count: number, dim: number, maxDegree: 0 | 1 | 2, extra: { maxScale?: number; vertexValues?: number[] } = {}): void {
  const edges = pairwiseDistances(coords, count, dim, 'euclidean');
  const got = ripsPersistence(count, edges, {
    maxDegree,
    maxScale: extra.maxScale,
    vertexValues: extra.vertexValues ? Float64Array.from(extra.vertexValues) : undefined,
  });
  const want = naiveRips(count, (i, j) => edges[condensedIndex(i, j, count)], maxDegree, extra);
  expect(got.length).toBe(maxDegree + 1);
  for (let d = 0; d <= maxDegree; d++) {
    expect(got[d].degree).toBe(d);
    expect(finiteOf(got[d])).toEqual(want.finite[d]);
    expect(essentialOf(got[d])).toBe(want.essential[d]);
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
      const c = new Float64Array(count * 3);
      for (let i = 0; i < count; i++) {
        const x = rng.normal();
        const y = rng.normal();
        const z = rng.normal();
        const r = Math.hypot(x, y, z);
        c[3 * i] = x / r;
        c[3 * i + 1] = y / r;
        c[3 * i + 2] = z / r;
      }
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
    for (let x = 0; x < 4; x++) for (let y = 0; y < 4; y++) if (x === 0 || y === 0 || x === 3 || y === 3) ring.push(x, y);
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
    expect(() => ripsPersistence(200, pairwiseDistances(c, 200, 3), { maxDegree: 2, memoryLimit: 1e6 })).toThrow(/--max-scale/);
  });
});
