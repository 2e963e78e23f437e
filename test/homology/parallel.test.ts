import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { computeDiagrams } from '../../src/homology/compute.js';
import { computeDiagramsParallel } from '../../src/homology/parallel.js';
import type { PointSample } from '../../src/io/dataset.js';

function clouds(count: number): PointSample[] {
  const rng = new Random(8);
  return Array.from({ length: count }, (_, k) => {
    const n = 20 + rng.int(20);
    const coords = new Float64Array(n * 2);
    for (let i = 0; i < coords.length; i++) coords[i] = rng.normal();
    return { kind: 'points', id: `c${k}`, label: k % 2 ? 'odd' : 'even', dim: 2, count: n, coords };
  });
}

describe('computeDiagramsParallel', () => {
  it('matches the one-thread result, in order, on two workers', async () => {
    const samples = clouds(12);
    const seen: number[] = [];
    const got = await computeDiagramsParallel(
      samples,
      { degrees: [0, 1] },
      { workers: 2, onProgress: (d) => seen.push(d) },
    );
    const want = samples.map((s) => computeDiagrams(s, { degrees: [0, 1] }));
    expect(got.map((s) => s.sample)).toEqual(samples.map((s) => s.id));
    for (let k = 0; k < samples.length; k++) {
      expect(Array.from(got[k].diagrams[1].births)).toEqual(Array.from(want[k].diagrams[1].births));
      expect(Array.from(got[k].diagrams[0].deaths)).toEqual(Array.from(want[k].diagrams[0].deaths));
    }
    expect(seen[seen.length - 1]).toBe(12);
  }, 30000);

  it('gives the first sample to the worker and the rest to whichever thread is free, with the same message for a mistake either way', async () => {
    // Sample 0 always goes to the worker (fed before the calling thread starts), so this error comes
    // back through the worker's reply; the test below has its error in the calling thread.
    const samples = clouds(3);
    samples[0] = { ...samples[0], coords: samples[0].coords.map((v, i) => (i === 1 ? Number.NaN : v)) };
    await expect(computeDiagramsParallel(samples, { degrees: [0] }, { workers: 2 })).rejects.toThrow(
      /sample 'c0'.*finite/,
    );
  }, 30000);

  it("passes a user mistake in one sample back as that sample's message", async () => {
    const samples = clouds(3);
    samples[1] = { ...samples[1], coords: samples[1].coords.map((v, i) => (i === 3 ? Number.NaN : v)) };
    await expect(computeDiagramsParallel(samples, { degrees: [0] }, { workers: 2 })).rejects.toThrow(
      /sample 'c1'.*finite/,
    );
  }, 30000);
});
