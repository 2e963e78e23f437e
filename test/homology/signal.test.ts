import { describe, expect, it } from 'vitest';
import { delayEmbedding, signalPersistence } from '../../src/homology/signal.js';

describe('signalPersistence', () => {
  it('pairs the minima of a hand-worked signal by the elder rule', () => {
    // Worked by hand: minima 0, 2 and 1; 2 merges into 1 at the peak 4, then 1 merges into 0 at 5
    // (elder rule, Edelsbrunner & Harer, "Computational Topology", 2010, section VII.1).
    const d = signalPersistence(Float64Array.from([0, 5, 2, 4, 1]));
    expect(d.degree).toBe(0);
    expect(Array.from(d.births)).toEqual([2, 1, 0]);
    expect(Array.from(d.deaths)).toEqual([4, 5, Infinity]);
  });

  it('reports superlevel pairs on the negated scale', () => {
    // Peaks 5 and 4 separated by the valley 2: the lower peak dies at 2; read as (−4, −2).
    const d = signalPersistence(Float64Array.from([0, 5, 2, 4, 1]), { superlevel: true });
    expect(Array.from(d.births)).toEqual([-4, -5]);
    expect(Array.from(d.deaths)).toEqual([-2, Infinity]);
  });

  it('gives a flat or monotone signal one essential class only', () => {
    expect(Array.from(signalPersistence(Float64Array.from([1, 1, 1])).deaths)).toEqual([Infinity]);
    expect(Array.from(signalPersistence(Float64Array.from([1, 2, 3, 4])).births)).toEqual([1]);
  });

  it('refuses missing values', () => {
    expect(() => signalPersistence(Float64Array.from([1, Number.NaN]))).toThrow(/finite/);
  });
});

describe('delayEmbedding', () => {
  it('builds windows of the given dimension, delay and stride', () => {
    const x = Float64Array.from([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    const e = delayEmbedding(x, { dimension: 3, delay: 2, stride: 3 });
    expect(e.count).toBe(2);
    expect(e.dim).toBe(3);
    expect(Array.from(e.coords)).toEqual([0, 2, 4, 3, 5, 7]);
    expect(delayEmbedding(x, { dimension: 2, delay: 1 }).count).toBe(9);
  });

  it('refuses a signal shorter than one window', () => {
    expect(() => delayEmbedding(Float64Array.from([1, 2, 3]), { dimension: 3, delay: 2 })).toThrow(
      /too short/,
    );
  });

  it('turns a sampled sine into a loop (sliding windows of a periodic signal)', async () => {
    // Perea & Harer, "Sliding windows and persistence: an application of topological methods to signal
    // analysis", 2015: the sliding-window cloud of a periodic signal lies on a closed curve.
    const { ripsPersistence } = await import('../../src/homology/rips.js');
    const { pairwiseDistances } = await import('../../src/homology/metric.js');
    const x = Float64Array.from({ length: 200 }, (_, t) => Math.sin((2 * Math.PI * t) / 25));
    const e = delayEmbedding(x, { dimension: 2, delay: 6 });
    const [, h1] = ripsPersistence(e.count, pairwiseDistances(e.coords, e.count, e.dim), { maxDegree: 1 });
    const long = Array.from(h1.births).filter((b, i) => h1.deaths[i] - b > 0.5);
    expect(long.length).toBe(1);
  });
});
