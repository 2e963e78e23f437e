import { afterEach, beforeEach, describe, expect, it } from 'vitest';
import { MEMORY_LIMIT_VARIABLE } from '../../src/core/budgets.js';
import { UserError } from '../../src/core/errors.js';
import { Random } from '../../src/core/random.js';
import type { DistanceSample, ImageSample, PointSample } from '../../src/core/sample.js';
import { computeDiagrams } from '../../src/homology/compute.js';
import { parseFiltrationList } from '../../src/homology/filtration.js';
import { pairwiseDistances } from '../../src/homology/metric.js';
import { ripsFloorBytes } from '../../src/homology/rips.js';

function square(): PointSample {
  // The unit square's corners: H1 born at the side 1, dies at the diagonal √2 (worked by hand).
  return {
    kind: 'points',
    id: 's',
    label: 'a',
    dim: 2,
    count: 4,
    coords: Float64Array.from([0, 0, 1, 0, 1, 1, 0, 1]),
  };
}

describe('computeDiagrams', () => {
  it('computes the requested degrees of a point cloud in order', () => {
    const set = computeDiagrams(square(), { degrees: [1, 0] });
    expect(set.sample).toBe('s');
    expect(set.label).toBe('a');
    expect(set.diagrams.map((d) => d.degree)).toEqual([0, 1]);
    expect(Array.from(set.diagrams[1].births)).toEqual([1]);
    expect(set.diagrams[1].deaths[0]).toBeCloseTo(Math.SQRT2, 12);
    expect(Array.from(set.diagrams[0].deaths)).toEqual([1, 1, 1, Infinity]);
  });

  it('gives a distance matrix the same diagrams as its cloud', () => {
    const s = square();
    const condensed = pairwiseDistances(s.coords, 4, 2);
    const matrix = new Float64Array(16);
    for (let j = 1, e = 0; j < 4; j++)
      for (let i = 0; i < j; i++, e++) {
        matrix[i * 4 + j] = condensed[e];
        matrix[j * 4 + i] = condensed[e];
      }
    const sample: DistanceSample = { kind: 'distances', id: 'm', label: 'a', size: 4, matrix };
    const a = computeDiagrams(sample, { degrees: [0, 1] });
    const b = computeDiagrams(s, { degrees: [0, 1] });
    expect(a.diagrams).toEqual(b.diagrams);
  });

  it('uses the chosen metric: Chebyshev makes the square a clique at 1', () => {
    const set = computeDiagrams(square(), { degrees: [1], metric: 'chebyshev' });
    expect(set.diagrams[0].births.length).toBe(0);
  });

  it('refuses an asymmetric distance matrix and a non-zero diagonal', () => {
    const bad: DistanceSample = {
      kind: 'distances',
      id: 'm',
      label: '',
      size: 2,
      matrix: Float64Array.from([0, 1, 2, 0]),
    };
    expect(() => computeDiagrams(bad, { degrees: [0] })).toThrow(/equal both ways/);
    bad.matrix = Float64Array.from([1, 1, 1, 0]);
    expect(() => computeDiagrams(bad, { degrees: [0] })).toThrow(/diagonal/);
  });

  it('asks for an embedding when a signal is asked for loops', () => {
    const s = { kind: 'signal' as const, id: 'x', label: '', values: Float64Array.from([1, 2, 1]) };
    expect(() => computeDiagrams(s, { degrees: [0, 1] })).toThrow(/--embed/);
    expect(computeDiagrams(s, { degrees: [0] }).diagrams[0].births.length).toBe(2);
    const e = computeDiagrams(s, { degrees: [0, 1], embed: { dimension: 2, delay: 1 } });
    expect(e.diagrams.length).toBe(2);
  });

  it('computes images by cubical persistence and refuses degrees beyond their axes', () => {
    const img = {
      kind: 'image' as const,
      id: 'i',
      label: '',
      shape: [3, 3],
      values: Float64Array.from([1, 1, 1, 1, 0, 1, 1, 1, 1]),
    };
    const set = computeDiagrams(img, { degrees: [0, 1], superlevel: true });
    expect(Array.from(set.diagrams[1].births)).toEqual([-1]);
    expect(Array.from(set.diagrams[1].deaths)).toEqual([0]);
    expect(() => computeDiagrams(img, { degrees: [2] })).toThrow(/degrees 0 to 1/);
  });

  it('refuses degrees outside 0–2 and an empty list', () => {
    expect(() => computeDiagrams(square(), { degrees: [] })).toThrow(/--degrees/);
    expect(() => computeDiagrams(square(), { degrees: [3] })).toThrow(/0, 1, 2/);
  });
});

describe('computeDiagrams with several filtrations', () => {
  // A 5 × 5 image holding a square loop of bright pixels (worked by hand): one component, one loop.
  const loop: ImageSample = {
    kind: 'image',
    id: 'loop',
    label: 'o',
    shape: [5, 5],
    values: Float64Array.from([0, 0, 0, 0, 0, 0, 9, 9, 9, 0, 0, 9, 0, 9, 0, 0, 9, 9, 9, 0, 0, 0, 0, 0, 0]),
  };

  it('tags every diagram, filtration-major in the order given, degrees ascending inside', () => {
    const list = parseFiltrationList('height:1:0,grey,distance');
    const set = computeDiagrams(loop, { degrees: [1, 0], filtration: list });
    expect(set.diagrams.map((d) => `${d.filtration}/H${d.degree}`)).toEqual([
      'height:1:0/H0',
      'height:1:0/H1',
      'grey/H0',
      'grey/H1',
      'distance/H0',
      'distance/H1',
    ]);
    // Each tagged diagram is the single-filtration diagram of that filtration (untagged there).
    for (const [k, f] of list.entries()) {
      const alone = computeDiagrams(loop, { degrees: [0, 1], filtration: f });
      expect(alone.diagrams.every((d) => d.filtration === undefined)).toBe(true);
      for (const degree of [0, 1]) {
        const tagged = set.diagrams[2 * k + degree];
        expect(Array.from(tagged.births)).toEqual(Array.from(alone.diagrams[degree].births));
        expect(Array.from(tagged.deaths)).toEqual(Array.from(alone.diagrams[degree].deaths));
      }
    }
    // Height downwards: the loop's top row (row 1) is born first; the hole fills with the background,
    // which enters at max row + 1 = 5.
    expect(Array.from(set.diagrams[1].births)).toEqual([3]);
    expect(Array.from(set.diagrams[1].deaths)).toEqual([5]);
  });

  it("keeps today's untagged grey diagrams for one filtration, and 'rips' alone means grey on images", () => {
    const plain = computeDiagrams(loop, { degrees: [0, 1] });
    const rips = computeDiagrams(loop, { degrees: [0, 1], filtration: 'rips' });
    const grey = computeDiagrams(loop, { degrees: [0, 1], filtration: { kind: 'grey' } });
    expect(rips).toEqual(plain);
    expect(grey).toEqual(plain);
    expect(() =>
      computeDiagrams(loop, { degrees: [0], filtration: parseFiltrationList('rips,grey') }),
    ).toThrow(/is an image; --filtration rips applies to point clouds/);
    expect(() => computeDiagrams(loop, { degrees: [0], filtration: { kind: 'dtm', k: 2 } })).toThrow(
      /for images choose grey/,
    );
  });

  it('applies --threshold to the binarised filtrations only', () => {
    // Threshold 10 leaves no foreground: the height filtration sees background only (one class at 5); grey
    // still sees the dark outside and the dark centre, joined when the bright loop enters at 9.
    const set = computeDiagrams(loop, {
      degrees: [0],
      filtration: parseFiltrationList('grey,height:1:0'),
      threshold: 10,
    });
    expect(Array.from(set.diagrams[0].deaths)).toEqual([9, Infinity]);
    expect(Array.from(set.diagrams[1].births)).toEqual([5]);
    expect(Array.from(set.diagrams[1].deaths)).toEqual([Infinity]);
  });

  it('passes given diagrams through with their tags, whatever filtrations are asked for', () => {
    const diagrams = computeDiagrams(loop, {
      degrees: [0, 1],
      filtration: parseFiltrationList('grey,erosion'),
    }).diagrams;
    const given = computeDiagrams(
      { kind: 'diagrams', id: 'g', label: 'o', diagrams },
      { degrees: [1], filtration: parseFiltrationList('height:1:0,distance') },
    );
    expect(given.diagrams).toEqual(diagrams.filter((d) => d.degree === 1));
    expect(given.diagrams.map((d) => d.filtration)).toEqual(['grey', 'erosion']);
  });

  it('computes clouds under a list of cloud filtrations and refuses image filtrations there', () => {
    const set = computeDiagrams(square(), { degrees: [1], filtration: parseFiltrationList('rips,alpha') });
    expect(set.diagrams.map((d) => d.filtration)).toEqual(['rips', 'alpha']);
    // Rips values are distances, alpha values radii: the square's loop dies at √2 and at √2 / 2.
    expect(set.diagrams[0].deaths[0]).toBeCloseTo(Math.SQRT2, 12);
    expect(set.diagrams[1].deaths[0]).toBeCloseTo(Math.SQRT2 / 2, 12);
    expect(() => computeDiagrams(square(), { degrees: [0], filtration: { kind: 'distance' } })).toThrow(
      /--filtration distance applies to images only/,
    );
  });
});

describe('memory guard before the distances are built', () => {
  let saved: string | undefined;
  beforeEach(() => {
    saved = process.env[MEMORY_LIMIT_VARIABLE];
  });
  afterEach(() => {
    if (saved === undefined) delete process.env[MEMORY_LIMIT_VARIABLE];
    else process.env[MEMORY_LIMIT_VARIABLE] = saved;
  });

  function cloud(count: number, seed = 7): PointSample {
    const random = new Random(seed);
    const coords = new Float64Array(2 * count);
    for (let i = 0; i < coords.length; i++) coords[i] = random.uniform();
    return { kind: 'points', id: 'big', label: 'a', dim: 2, count, coords };
  }

  it('refuses a 60,000-point Rips cloud from its size alone, naming the need and the limit', () => {
    process.env[MEMORY_LIMIT_VARIABLE] = '8G';
    // 60,000 points: n(n − 1)/2 = 1,799,970,000 pairs × 12 bytes + 4n² = 35,999,640,000 bytes = 33.5 GiB
    // (arithmetic on the layout described at ripsFloorBytes).
    expect(ripsFloorBytes(60_000)).toBe(35_999_640_000);
    const before = process.memoryUsage().arrayBuffers;
    let error: unknown;
    try {
      computeDiagrams(cloud(60_000), { degrees: [0, 1] });
    } catch (e) {
      error = e;
    }
    expect(error).toBeInstanceOf(UserError);
    const message = (error as UserError).message;
    expect(message).toMatch(/60000 points/);
    expect(message).toMatch(/33\.5 GB/);
    expect(message).toMatch(/limit 8192 MB/);
    expect(message).toMatch(/--subsample/);
    // Nothing of the 14 GB distance table was allocated (the cloud itself is 0.96 MB).
    expect(process.memoryUsage().arrayBuffers - before).toBeLessThan(64 * 2 ** 20);
  });

  it('lets the same cloud through with --subsample: the guard applies to the landmarks actually built', () => {
    process.env[MEMORY_LIMIT_VARIABLE] = '8G';
    const set = computeDiagrams(cloud(60_000), {
      degrees: [0, 1],
      subsample: { method: 'maxmin', count: 150, seed: 1 },
    });
    // One H0 pair per landmark (the elder rule gives n pairs, one of them essential).
    expect(set.diagrams[0].births.length).toBe(150);
    expect(set.diagrams[0].deaths[149]).toBe(Infinity);
    expect(set.coveringRadius).toBeGreaterThan(0);
  });

  it('refuses the DTM filtration of a large cloud before its distances are built', () => {
    process.env[MEMORY_LIMIT_VARIABLE] = '8G';
    expect(() => computeDiagrams(cloud(60_000), { degrees: [0], filtration: { kind: 'dtm', k: 5 } })).toThrow(
      /the DTM filtration of 60000 points.*limit 8192 MB/,
    );
  });

  it('refuses a distance matrix whose condensed copy and rank tables exceed the limit', () => {
    const small = cloud(400);
    const matrix = new Float64Array(400 * 400);
    const condensed = pairwiseDistances(small.coords, 400, 2, 'euclidean');
    for (let j = 1; j < 400; j++)
      for (let i = 0; i < j; i++) {
        const d = condensed[(j * (j - 1)) / 2 + i];
        matrix[i * 400 + j] = d;
        matrix[j * 400 + i] = d;
      }
    const sample: DistanceSample = { kind: 'distances', id: 'm', label: 'a', size: 400, matrix };
    // 400 vertices: 79,800 pairs × 12 + 4 · 400² = 1,597,600 bytes, above 1 MiB.
    process.env[MEMORY_LIMIT_VARIABLE] = '1M';
    expect(() => computeDiagrams(sample, { degrees: [0] })).toThrow(/400 points.*limit 1 MB/);
    process.env[MEMORY_LIMIT_VARIABLE] = '8M';
    expect(computeDiagrams(sample, { degrees: [0] }).diagrams[0].births.length).toBe(400);
  });
});
