import { describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { cubicalPersistence } from '../../src/homology/cubical.js';
import { type NaiveCell, naiveReduce } from './naive-reduction.js';

function finiteOf(d: Diagram): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < d.births.length; i++)
    if (d.deaths[i] !== Infinity) out.push([d.births[i], d.deaths[i]]);
  return out.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
}

/**
 * The explicit cubical complex of a D × H × W grid with values on the vertices (each cube takes the largest
 * vertex value): every cell listed with its facets, built independently of the library's indexing.
 */
function explicitComplex(values: Float64Array, D: number, H: number, W: number): NaiveCell[] {
  const cells: NaiveCell[] = [];
  const key = new Map<string, number>();
  // A cell is the box [z, z+dz] × [y, y+dy] × [x, x+dx] with d* in {0, 1}.
  for (let dim = 0; dim <= 3; dim++) {
    for (let dz = 0; dz <= 1; dz++)
      for (let dy = 0; dy <= 1; dy++)
        for (let dx = 0; dx <= 1; dx++) {
          if (dz + dy + dx !== dim) continue;
          for (let z = 0; z + dz < D; z++)
            for (let y = 0; y + dy < H; y++)
              for (let x = 0; x + dx < W; x++) {
                let value = -Infinity;
                for (let a = 0; a <= dz; a++)
                  for (let b = 0; b <= dy; b++)
                    for (let c = 0; c <= dx; c++)
                      value = Math.max(value, values[((z + a) * H + y + b) * W + x + c]);
                const faces: number[] = [];
                const ext = [dz, dy, dx];
                const at = [z, y, x];
                for (let axis = 0; axis < 3; axis++) {
                  if (ext[axis] === 0) continue;
                  for (let side = 0; side <= 1; side++) {
                    const e2 = ext.slice();
                    e2[axis] = 0;
                    const a2 = at.slice();
                    a2[axis] += side;
                    faces.push(key.get(`${a2.join(',')}|${e2.join(',')}`) as number);
                  }
                }
                key.set(`${at.join(',')}|${ext.join(',')}`, cells.length);
                cells.push({ value, dim, faces });
              }
        }
  }
  return cells;
}

function agree(values: Float64Array, shape: number[]): void {
  const D = shape.length === 3 ? shape[0] : 1;
  const H = shape[shape.length - 2];
  const W = shape[shape.length - 1];
  const top = shape.length - 1;
  const got = cubicalPersistence(values, shape);
  const want = naiveReduce(explicitComplex(values, D, H, W), top);
  expect(got.length).toBe(top + 1);
  for (let d = 0; d <= top; d++) {
    expect(got[d].degree).toBe(d);
    expect(finiteOf(got[d])).toEqual(want.finite[d]);
    let ess = 0;
    for (const x of got[d].deaths) if (x === Infinity) ess++;
    expect(ess).toBe(want.essential[d]);
  }
}

// Reference: the standard column reduction over Z/2 (Edelsbrunner & Harer, "Computational Topology", 2010)
// of the explicit cubical complex, written independently in this test.
describe('cubicalPersistence against a naive cubical reduction', () => {
  it('agrees on random 2-D images, with and without ties', () => {
    const rng = new Random(42);
    for (let trial = 0; trial < 25; trial++) {
      const h = 2 + rng.int(6);
      const w = 2 + rng.int(6);
      const v = new Float64Array(h * w);
      const levels = trial % 2 === 0 ? 0 : 4; // odd trials: few grey levels, many ties
      for (let i = 0; i < v.length; i++) v[i] = levels ? rng.int(levels) : rng.next();
      agree(v, [h, w]);
    }
  });

  it('agrees on random 3-D volumes in degrees 0–2', () => {
    const rng = new Random(43);
    for (let trial = 0; trial < 12; trial++) {
      const d = 2 + rng.int(3);
      const h = 2 + rng.int(3);
      const w = 2 + rng.int(3);
      const v = new Float64Array(d * h * w);
      for (let i = 0; i < v.length; i++) v[i] = trial % 3 === 0 ? rng.int(3) : rng.next();
      agree(v, [d, h, w]);
    }
  });

  it('agrees on thin images (one row) and single pixels', () => {
    agree(Float64Array.from([3, 1, 4, 1, 5, 9, 2, 6]), [1, 8]);
    agree(Float64Array.from([7]), [1, 1]);
  });
});

describe('cubicalPersistence on images with known answers', () => {
  it('finds one loop in a ring of bright pixels under superlevel sets', () => {
    // A 7 × 7 dark image with a bright square ring (value 10) around a dark centre (textbook fact: an
    // annulus has one 1-dimensional hole).
    const v = new Float64Array(49);
    for (let y = 1; y <= 5; y++)
      for (let x = 1; x <= 5; x++) if (y === 1 || y === 5 || x === 1 || x === 5) v[y * 7 + x] = 10;
    const [h0, h1] = cubicalPersistence(v, [7, 7], { superlevel: true });
    // Negated scale: the ring appears at −10 and its hole is filled when the dark centre (0) enters.
    expect(finiteOf(h1)).toEqual([[-10, 0]]);
    expect(Array.from(h0.births)).toEqual([-10]);
    expect(Array.from(h0.deaths)).toEqual([Infinity]);
    // Under sublevel sets the dark centre is a second piece until the ring enters at 10, and the dark
    // frame along the border is itself a loop around the ring, filled at 10.
    const [s0, s1] = cubicalPersistence(v, [7, 7]);
    expect(finiteOf(s0)).toEqual([[0, 10]]);
    expect(finiteOf(s1)).toEqual([[0, 10]]);
  });

  it('finds one void in a hollow bright box under superlevel sets', () => {
    const n = 5;
    const v = new Float64Array(n * n * n);
    for (let z = 1; z <= 3; z++)
      for (let y = 1; y <= 3; y++)
        for (let x = 1; x <= 3; x++) if (!(z === 2 && y === 2 && x === 2)) v[(z * n + y) * n + x] = 1;
    const [, h1, h2] = cubicalPersistence(v, [n, n, n], { superlevel: true });
    expect(finiteOf(h2)).toEqual([[-1, 0]]);
    expect(h1.births.length).toBe(0);
  });

  it('pairs two basins of a 1-D image by the elder rule', () => {
    const [h0] = cubicalPersistence(Float64Array.from([0, 5, 2]), [3]);
    expect(finiteOf(h0)).toEqual([[2, 5]]);
  });
});
