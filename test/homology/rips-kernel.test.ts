import { spawnSync } from 'node:child_process';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { METRICS, pairwiseDistances } from '../../src/homology/metric.js';
import { cloudRipsPersistence, ripsPersistence } from '../../src/homology/rips.js';
import { kernelFits, kernelMemoryBytes, kernelRips } from '../../src/homology/rips-kernel.js';
import { spherePoints } from './sphere-points.js';

/*
 * The WebAssembly engine of degrees 0–1 (wasm/rips-low.ts) must give the TypeScript engine's diagrams
 * exactly: the same pairs, as the same doubles, in the same order. Both are checked against the naive
 * reduction of the standard algorithm in rips.test.ts (Edelsbrunner & Harer, "Computational Topology",
 * 2010); here the two engines are compared on many more and larger clouds than the naive reduction can take.
 */

function expectSame(got: Diagram[], want: Diagram[]): void {
  expect(got.length).toBe(want.length);
  for (let d = 0; d < want.length; d++) {
    expect(got[d].degree).toBe(want[d].degree);
    expect(Array.from(got[d].births)).toEqual(Array.from(want[d].births));
    expect(Array.from(got[d].deaths)).toEqual(Array.from(want[d].deaths));
  }
}

/** A cloud of one of four shapes: uniform, lattice (many tied distances), with duplicates, or nearly equal values. */
function cloud(rng: Random, count: number, dim: number, shape: number): Float64Array {
  const c = new Float64Array(count * dim);
  for (let i = 0; i < c.length; i++) {
    if (shape === 0) c[i] = rng.uniform(-1, 1);
    else if (shape === 1) c[i] = rng.int(4);
    else if (shape === 2)
      c[i] = i < (count >> 1) * dim ? rng.uniform(-1, 1) : c[rng.int(count >> 1) * dim + (i % dim)];
    else c[i] = 1 + rng.next() * 1e-9; // distances that share their high 32 bits: the sort's four-pass path
  }
  return c;
}

describe('the WebAssembly Rips kernel against the TypeScript engine', () => {
  it('gives the same pairs in the same order on 400 random clouds (ties, duplicates, scale cuts, vertex values)', () => {
    const rng = new Random(20261202);
    let pairs1 = 0;
    for (let trial = 0; trial < 400; trial++) {
      const count = 2 + rng.int(70);
      const dim = 1 + rng.int(4);
      const c = cloud(rng, count, dim, trial % 4);
      const edges = pairwiseDistances(c, count, dim);
      const maxDegree = trial % 5 === 0 ? 0 : 1;
      const options: { maxDegree: 0 | 1; maxScale?: number; vertexValues?: Float64Array } = { maxDegree };
      if (trial % 3 === 1) options.maxScale = rng.uniform(0, 1.2);
      if (trial % 7 === 2)
        options.vertexValues = Float64Array.from({ length: count }, () =>
          trial % 2 === 0 ? rng.int(3) / 2 : rng.uniform(0, 0.4),
        );
      const want = ripsPersistence(count, edges, { ...options, kernel: false });
      expectSame(ripsPersistence(count, edges, options), want);
      if (maxDegree === 1) pairs1 += want[1].births.length;
    }
    // The comparison is not vacuous: degree 1 had pairs to compare.
    expect(pairs1).toBeGreaterThan(300);
  });

  it('computes the distances of every metric as pairwiseDistances does', () => {
    const rng = new Random(7);
    for (const metric of METRICS) {
      for (let trial = 0; trial < 20; trial++) {
        const count = 3 + rng.int(60);
        const dim = 1 + rng.int(5);
        const c = cloud(rng, count, dim, trial % 3);
        const want = ripsPersistence(count, pairwiseDistances(c, count, dim, metric), {
          maxDegree: 1,
          kernel: false,
        });
        expectSame(cloudRipsPersistence(c, count, dim, metric, { maxDegree: 1 }), want);
      }
    }
  });

  it('grows its memory for a large cloud and reuses it for small ones', () => {
    const rng = new Random(8);
    for (const count of [40, 1500, 25]) {
      const c = cloud(rng, count, 3, 0);
      const edges = pairwiseDistances(c, count, 3);
      expectSame(
        ripsPersistence(count, edges, { maxDegree: 1 }),
        ripsPersistence(count, edges, { maxDegree: 1, kernel: false }),
      );
    }
    expect(kernelMemoryBytes()).toBeLessThan(2 ** 28);
    expect(kernelFits(5000)).toBe(true);
    expect(kernelFits(8000)).toBe(false);
  });

  it('gives its memory back after a cloud that needed more than 128 MB', () => {
    const rng = new Random(9);
    const count = 2700;
    const [h0] = ripsPersistence(count, pairwiseDistances(cloud(rng, count, 3, 0), count, 3), {
      maxDegree: 0,
    });
    // Uniform points in a cube: one component in the end, all others die (textbook: b0 of a connected set).
    expect(h0.births.length).toBe(count);
    expect(h0.deaths.filter((d) => d === Infinity).length).toBe(1);
    expect(kernelMemoryBytes()).toBe(0);
    ripsPersistence(30, pairwiseDistances(cloud(rng, 30, 3, 0), 30, 3), { maxDegree: 1 });
    expect(kernelMemoryBytes()).toBeGreaterThan(0);
    expect(kernelMemoryBytes()).toBeLessThan(2 ** 24);
  });

  it('gives a sample back to the TypeScript engine when its memory cannot grow', () => {
    // 33,000 points need 4.4 GB for their edge values alone, beyond a 32-bit WebAssembly memory: the kernel
    // traps while it reserves them (before reading any value), and answers undefined.
    expect(kernelFits(33000)).toBe(false);
    expect(kernelRips(33000, new Float64Array(0), 1, Infinity, undefined)).toBeUndefined();
    expect(kernelMemoryBytes()).toBe(0);
    // The next sample gets a new instance.
    const edges = pairwiseDistances(cloud(new Random(4), 30, 2, 0), 30, 2);
    expectSame(
      ripsPersistence(30, edges, { maxDegree: 1 }),
      ripsPersistence(30, edges, { maxDegree: 1, kernel: false }),
    );
  });

  it('leaves an invalid distance to the checks that name it', () => {
    const edges = Float64Array.from([1, Number.NaN, 2]);
    expect(() => ripsPersistence(3, edges, { maxDegree: 1 })).toThrow(
      /distance between points 1 and 3 is NaN; distances must be numbers ≥ 0/,
    );
    expect(() => ripsPersistence(3, Float64Array.from([1, 2, -1]), { maxDegree: 0 })).toThrow(
      /points 2 and 3 is -1/,
    );
  });
});

describe('the committed kernel bytes', () => {
  it('are what wasm/rips-low.ts compiles to', () => {
    const root = join(dirname(fileURLToPath(import.meta.url)), '../..');
    const run = spawnSync(process.execPath, [join(root, 'wasm/build.mjs'), '--check'], { encoding: 'utf8' });
    expect(run.stdout.trim()).toBe('kernel bytes are up to date');
    expect(run.status).toBe(0);
  });
});

describe('the WebAssembly Rips kernel in degree 2', () => {
  it('gives the TypeScript engine’s pairs (both with the edge collapse) on 120 random clouds', () => {
    const rng = new Random(2);
    let pairs2 = 0;
    for (let trial = 0; trial < 120; trial++) {
      const count = 4 + rng.int(60);
      const dim = 2 + rng.int(3);
      const c = cloud(rng, count, dim, trial % 3);
      // Every fourth cloud on the unit sphere of its space, where voids appear.
      if (trial % 4 === 3)
        for (let i = 0; i < count; i++) {
          let r = 0;
          for (let d = 0; d < dim; d++) r += c[i * dim + d] ** 2;
          for (let d = 0; d < dim; d++) c[i * dim + d] /= Math.sqrt(r) || 1;
        }
      const edges = pairwiseDistances(c, count, dim);
      const options: { maxDegree: 2; maxScale?: number; vertexValues?: Float64Array } = { maxDegree: 2 };
      if (trial % 5 === 1) options.maxScale = rng.uniform(0.3, 1.5);
      if (trial % 7 === 2)
        options.vertexValues = Float64Array.from({ length: count }, () => rng.uniform(0, 0.3));
      const want = ripsPersistence(count, edges, { ...options, kernel: false });
      expectSame(ripsPersistence(count, edges, options), want);
      pairs2 += want[2].births.length;
    }
    expect(pairs2).toBeGreaterThan(40);
  });

  it('finds the void of 200 points near the sphere as the TypeScript engine does', () => {
    const rng = new Random(3);
    const count = 200;
    const c = spherePoints(rng, count);
    const edges = pairwiseDistances(c, count, 3);
    const got = ripsPersistence(count, edges, { maxDegree: 2 });
    expectSame(got, ripsPersistence(count, edges, { maxDegree: 2, kernel: false }));
    // The sphere S² has b2 = 1 (textbook): one long H2 bar.
    const long = got[2].births.filter((b, i) => got[2].deaths[i] - b > 0.5).length;
    expect(long).toBe(1);
  });
});
