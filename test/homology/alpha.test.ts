import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/core/diagram.js';
import { UserError } from '../../src/core/errors.js';
import { Random } from '../../src/core/random.js';
import {
  alphaComplex,
  alphaComplexPersistence,
  alphaDimensionError,
  alphaPersistence,
} from '../../src/homology/alpha.js';
import { complexPersistence } from '../../src/homology/filtered-complex.js';
import { enclosingRadius3, naiveCechDiagrams } from './naive-cech.js';

/** Pairs of a diagram as sorted [birth, death] rows, zero-persistence pairs removed. */
function rows(d: Diagram): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < d.births.length; i++)
    if (d.deaths[i] > d.births[i] + 1e-12) out.push([d.births[i], d.deaths[i]]);
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}

function expectSameDiagrams(actual: Diagram[], expected: Diagram[]): void {
  for (const degree of [0, 1]) {
    const a = rows(actual[degree]);
    const e = rows(expected[degree]);
    expect(a.length, `H${degree} pair count`).toBe(e.length);
    for (let i = 0; i < a.length; i++) {
      expect(a[i][0]).toBeCloseTo(e[i][0], 9);
      if (e[i][1] === Infinity) expect(a[i][1]).toBe(Infinity);
      else expect(a[i][1]).toBeCloseTo(e[i][1], 9);
    }
  }
}

function randomCloud(seed: number, n: number): Float64Array {
  const r = new Random(seed);
  return Float64Array.from({ length: 2 * n }, () => r.uniform(-1, 1));
}

describe('naive Čech helper', () => {
  it('encloses an acute triangle in its circumcircle and an obtuse one in its longest side', () => {
    // Equilateral triangle of side 1: circumradius 1/√3 (Euclid, Elements IV.5; any geometry text).
    expect(enclosingRadius3([0, 0, 1, 0, 0.5, Math.sqrt(3) / 2], 0, 1, 2)).toBeCloseTo(1 / Math.sqrt(3), 12);
    // Obtuse: (0,0), (4,0), (2,1): the disc on the side of length 4 (radius 2) holds (2,1).
    expect(enclosingRadius3([0, 0, 4, 0, 2, 1], 0, 1, 2)).toBeCloseTo(2, 12);
  });
});

describe('reduction of an explicit filtered complex', () => {
  it('gives the unit square its one loop, born at the side and killed at the diagonal', () => {
    // Worked example: the Rips filtration (on distances) of the four corners of a unit square has one H1
    // class [1, √2) and H0 deaths 1, 1, 1 (Edelsbrunner & Harer, "Computational Topology", 2010, §III.2).
    const s2 = Math.SQRT2;
    const edges = Int32Array.from([0, 1, 1, 2, 2, 3, 0, 3, 0, 2, 1, 3]);
    const edgeValues = Float64Array.from([1, 1, 1, 1, s2, s2]);
    const triangles = Int32Array.from([0, 1, 2, 0, 1, 3, 0, 2, 3, 1, 2, 3]);
    const triangleValues = Float64Array.from([s2, s2, s2, s2]);
    const [h0, h1] = complexPersistence(
      {
        simplices: [Int32Array.from([0, 1, 2, 3]), edges, triangles],
        values: [new Float64Array(4), edgeValues, triangleValues],
      },
      1,
    );
    expect(rows(h0)).toEqual([
      [0, 1],
      [0, 1],
      [0, 1],
      [0, Infinity],
    ]);
    expect(rows(h1)).toEqual([[1, s2]]);
  });
});

describe('alpha filtration in the plane', () => {
  it('gives an equilateral triangle its loop from half the side to the circumradius', () => {
    // Hand-worked: the three discs meet pairwise at radius 1/2 and all together at the circumradius 1/√3.
    const [h0, h1] = alphaPersistence([0, 0, 1, 0, 0.5, Math.sqrt(3) / 2], 3);
    expect(rows(h0).map((r) => r[1])).toEqual([expect.closeTo(0.5, 12), expect.closeTo(0.5, 12), Infinity]);
    expect(rows(h1).length).toBe(1);
    expect(rows(h1)[0][0]).toBeCloseTo(0.5, 12);
    expect(rows(h1)[0][1]).toBeCloseTo(1 / Math.sqrt(3), 12);
  });

  it('gives an obtuse triangle no loop, and attaches its longest edge to it', () => {
    // (0,0), (4,0), (2,1): the long side's diametral disc holds (2,1), so that side enters with the triangle.
    const complex = alphaComplex([0, 0, 4, 0, 2, 1], 3);
    expect(complex.triangleValues.length).toBe(1);
    const circum = 1.25 * 2; // sides √5, √5, 4; area 2; R = √5·√5·4 / (4·2) = 2.5
    expect(complex.triangleValues[0]).toBeCloseTo(circum, 12);
    const longEdge = [...complex.edgeValues].sort((a, b) => b - a)[0];
    expect(longEdge).toBeCloseTo(circum, 12);
    const [, h1] = alphaComplexPersistence(complex);
    expect(rows(h1)).toEqual([]);
  });

  it('equals the naive Čech filtration on random clouds (nerve theorem)', () => {
    // Nerve theorem: alpha and Čech complexes have the same persistence (Edelsbrunner & Harer 2010, §III.4).
    for (let seed = 1; seed <= 12; seed++) {
      const n = 5 + (seed % 8);
      const cloud = randomCloud(seed, n);
      expectSameDiagrams(alphaPersistence(cloud, n), naiveCechDiagrams(cloud, n));
    }
  });

  it('pairs loops by duality exactly as the standard reduction of the same complex', () => {
    // Planar duality (de Silva, Morozov & Vejdemo-Johansson, "Dualities in persistent (co)homology", 2011)
    // checked against the column reduction (Edelsbrunner, Letscher & Zomorodian 2002) on 300 points.
    const n = 300;
    const cloud = randomCloud(7, n);
    const complex = alphaComplex(cloud, n);
    const byReduction = complexPersistence(
      {
        simplices: [
          Int32Array.from({ length: complex.vertexCount }, (_, i) => i),
          complex.edges,
          complex.triangles,
        ],
        values: [new Float64Array(complex.vertexCount), complex.edgeValues, complex.triangleValues],
      },
      1,
    );
    const byDuality = alphaComplexPersistence(complex);
    expect(rows(byDuality[1]).length).toBeGreaterThan(5);
    expectSameDiagrams(byDuality, byReduction);
  });

  it('equals the naive Čech filtration on a lattice (many ties, right angles)', () => {
    const pts: number[] = [];
    for (let i = 0; i < 4; i++) for (let j = 0; j < 3; j++) pts.push(i, j);
    // Each unit square has a loop [1/2, √2/2); the Čech reference decides the exact pairs.
    const alpha = alphaPersistence(pts, 12);
    expectSameDiagrams(alpha, naiveCechDiagrams(pts, 12));
    expect(rows(alpha[1]).length).toBe(6);
    expect(rows(alpha[1])[0][1]).toBeCloseTo(Math.SQRT1_2, 12);
  });

  it('equals the naive Čech filtration on cocircular points, with and without a centre', () => {
    for (const n of [4, 6, 8, 11]) {
      const ring: number[] = [];
      for (let i = 0; i < n; i++) ring.push(Math.cos((2 * Math.PI * i) / n), Math.sin((2 * Math.PI * i) / n));
      const alpha = alphaPersistence(ring, n);
      expectSameDiagrams(alpha, naiveCechDiagrams(ring, n));
      // One loop from half the chord to the circumradius 1.
      expect(rows(alpha[1]).length).toBe(1);
      expect(rows(alpha[1])[0][1]).toBeCloseTo(1, 9);
      const withCentre = [...ring, 0, 0];
      expectSameDiagrams(alphaPersistence(withCentre, n + 1), naiveCechDiagrams(withCentre, n + 1));
    }
  });

  it('equals the naive Čech filtration on small integer clouds (duplicates, collinear runs, cocircular sets)', () => {
    // Integer coordinates in 0..4 make every degeneracy common at once; the Čech reference is exact about them.
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: 4 }), fc.integer({ min: 0, max: 4 })), {
          minLength: 1,
          maxLength: 10,
        }),
        (pts) => {
          const flat = pts.flat();
          const distinct = [...new Set(pts.map((p) => p.join(',')))].flatMap((k) => k.split(',').map(Number));
          expectSameDiagrams(
            alphaPersistence(flat, pts.length),
            naiveCechDiagrams(distinct, distinct.length / 2),
          );
        },
      ),
      { numRuns: 150, seed: 20 },
    );
  });

  it('merges duplicate points at 0 and gives the same diagrams as without them', () => {
    const cloud = randomCloud(99, 9);
    const doubled = Float64Array.from([...cloud, cloud[0], cloud[1], cloud[4], cloud[5], cloud[4], cloud[5]]);
    expectSameDiagrams(alphaPersistence(doubled, 12), naiveCechDiagrams(cloud, 9));
    expect(alphaComplex(doubled, 12).vertexCount).toBe(9);
  });

  it('handles collinear points: a path, no loops', () => {
    const line = [0, 0, 3, 1.5, 1, 0.5, 2, 1, 6, 3];
    const [h0, h1] = alphaPersistence(line, 5);
    // Gaps along the line: √1.25 ×3 and 3·√1.25, halved.
    const g = Math.sqrt(1.25) / 2;
    const deaths = rows(h0).map((r) => r[1]);
    expect(deaths.slice(0, 3).every((d) => Math.abs(d - g) < 1e-12)).toBe(true);
    expect(deaths[3]).toBeCloseTo(3 * g, 12);
    expect(deaths[4]).toBe(Infinity);
    expect(rows(h1)).toEqual([]);
    expectSameDiagrams([h0, h1], naiveCechDiagrams(line, 5));
  });

  it('handles one and two points', () => {
    expect(rows(alphaPersistence([1, 2], 1)[0])).toEqual([[0, Infinity]]);
    expect(rows(alphaPersistence([0, 0, 0, 2], 2)[0])).toEqual([
      [0, 1],
      [0, Infinity],
    ]);
  });

  it('truncates at maxScale: later deaths become essential, later births vanish', () => {
    const ring: number[] = [];
    for (let i = 0; i < 8; i++) ring.push(Math.cos((Math.PI * i) / 4), Math.sin((Math.PI * i) / 4));
    const [h0, h1] = alphaPersistence(ring, 8, { maxScale: 0.9 });
    expect(rows(h1).length).toBe(1);
    expect(rows(h1)[0][1]).toBe(Infinity);
    expect(rows(h0).filter((r) => r[1] === Infinity).length).toBe(1);
    const [, none] = alphaPersistence(ring, 8, { maxScale: 0.1 });
    expect(rows(none)).toEqual([]);
  });

  it('says which filtrations apply to a non-planar sample', () => {
    const error = alphaDimensionError(3);
    expect(error).toBeInstanceOf(UserError);
    expect(error.message).toMatch(/2-D point clouds only.*3 coordinates.*rips.*dtm:K/);
  });
});
