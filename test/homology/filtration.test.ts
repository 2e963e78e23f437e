import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { Random } from '../../src/core/random.js';
import { alphaPersistence } from '../../src/homology/alpha.js';
import { dtmPersistence } from '../../src/homology/dtm.js';
import {
  checkFiltrationApplies,
  cloudFiltrationDiagrams,
  describeFiltration,
  matrixFiltrationDiagrams,
  parseFiltration,
  subsampleForFiltration,
} from '../../src/homology/filtration.js';

function cloud(seed: number, n: number, dim: number): Float64Array {
  const r = new Random(seed);
  return Float64Array.from({ length: n * dim }, () => r.normal());
}

describe('filtration choice', () => {
  it('parses rips, dtm:K and alpha and prints them back', () => {
    expect(parseFiltration('rips')).toBe('rips');
    expect(parseFiltration('alpha')).toBe('alpha');
    expect(parseFiltration('dtm:10')).toEqual({ kind: 'dtm', k: 10 });
    expect(describeFiltration({ kind: 'dtm', k: 7 })).toBe('dtm:7');
    for (const bad of ['dtm', 'dtm:0', 'dtm:x', 'cech', '']) expect(parseFiltration(bad)).toBeUndefined();
  });

  it('routes clouds to the alpha and DTM code', () => {
    const c = cloud(1, 30, 2);
    const alpha = cloudFiltrationDiagrams(c, 30, 2, { filtration: 'alpha', maxDegree: 2, id: 's' });
    expect(alpha.map((d) => d.degree)).toEqual([0, 1, 2]);
    expect(Array.from(alpha[1].deaths)).toEqual(Array.from(alphaPersistence(c, 30)[1].deaths));
    expect(alpha[2].births.length).toBe(0);
    const dtm = cloudFiltrationDiagrams(c, 30, 2, {
      filtration: { kind: 'dtm', k: 4 },
      maxDegree: 1,
      id: 's',
    });
    expect(Array.from(dtm[0].births)).toEqual(
      Array.from(dtmPersistence(c, 30, 2, 4, { maxDegree: 1 })[0].births),
    );
  });

  it('refuses alpha off the plane, on matrices and with another metric, saying what applies', () => {
    const c = cloud(2, 10, 3);
    expect(() =>
      cloudFiltrationDiagrams(c, 10, 3, { filtration: 'alpha', maxDegree: 1, id: 'part-7' }),
    ).toThrow(/part-7.*2-D point clouds only.*rips.*dtm:K/);
    expect(() =>
      cloudFiltrationDiagrams(cloud(2, 10, 2), 10, 2, {
        filtration: 'alpha',
        maxDegree: 1,
        metric: 'manhattan',
        id: 'x',
      }),
    ).toThrow(UserError);
    expect(() =>
      matrixFiltrationDiagrams(new Float64Array(4), 2, { filtration: 'alpha', maxDegree: 1, id: 'm' }),
    ).toThrow(/distance matrix.*rips.*dtm:K/);
    expect(() =>
      cloudFiltrationDiagrams(c, 10, 3, { filtration: { kind: 'dtm', k: 11 }, maxDegree: 1, id: 'q' }),
    ).toThrow(/q.*only 10 points/);
    expect(() => checkFiltrationApplies('image', 'alpha', 'img')).toThrow(/img.*image.*point clouds/);
    expect(() => checkFiltrationApplies('image', 'rips', 'img')).not.toThrow();
  });

  it('subsamples before the filtration and returns the covering radius', () => {
    const c = cloud(3, 200, 2);
    const { sample, coveringRadius } = subsampleForFiltration(
      { kind: 'points', id: 'a', label: 'x', dim: 2, count: 200, coords: c },
      { method: 'maxmin', count: 20, seed: 1 },
    );
    expect(sample.count).toBe(20);
    expect(coveringRadius).toBeGreaterThan(0);
    expect(
      subsampleForFiltration(
        { kind: 'points', id: 'a', label: 'x', dim: 2, count: 200, coords: c },
        undefined,
      ).coveringRadius,
    ).toBeUndefined();
  });
});

describe('computeDiagrams with a filtration and landmarks', () => {
  it('computes DTM and alpha diagrams and records the covering radius of the landmarks', async () => {
    const { computeDiagrams } = await import('../../src/homology/compute.js');
    const c = cloud(5, 120, 2);
    const sample = { kind: 'points' as const, id: 'p1', label: 'a', dim: 2, count: 120, coords: c };
    const alpha = computeDiagrams(sample, { degrees: [0, 1], filtration: 'alpha' });
    expect(Array.from(alpha.diagrams[1].deaths)).toEqual(Array.from(alphaPersistence(c, 120)[1].deaths));
    expect(alpha.coveringRadius).toBeUndefined();
    const dtm = computeDiagrams(sample, {
      degrees: [0],
      filtration: { kind: 'dtm', k: 5 },
      subsample: { method: 'maxmin', count: 40, seed: 2 },
    });
    expect(dtm.coveringRadius).toBeGreaterThan(0);
    expect(dtm.diagrams[0].births.length).toBeLessThanOrEqual(40);
    expect(Math.min(...Array.from(dtm.diagrams[0].births))).toBeGreaterThan(0); // DTM births are not 0
    const m = new Float64Array(120 * 120);
    for (let i = 0; i < 120; i++)
      for (let j = 0; j < 120; j++)
        m[i * 120 + j] = Math.hypot(c[2 * i] - c[2 * j], c[2 * i + 1] - c[2 * j + 1]);
    const fromMatrix = computeDiagrams(
      { kind: 'distances', id: 'd', label: 'a', size: 120, matrix: m },
      { degrees: [0, 1], filtration: { kind: 'dtm', k: 5 } },
    );
    const fromCloud = computeDiagrams(sample, { degrees: [0, 1], filtration: { kind: 'dtm', k: 5 } });
    expect(fromMatrix.diagrams[1].births.length).toBe(fromCloud.diagrams[1].births.length);
    expect(() =>
      computeDiagrams(
        { kind: 'image', id: 'im', label: 'a', shape: [2, 2], values: new Float64Array(4) },
        { degrees: [0], filtration: 'alpha' },
      ),
    ).toThrow(/image/);
  });
});
