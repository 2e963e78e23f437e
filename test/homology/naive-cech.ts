/**
 * Test helper: the Čech filtration of a small planar cloud, built in full (every edge and triangle of the
 * n points) with each simplex at the radius of its smallest enclosing disc, and reduced by the standard
 * algorithm. Edelsbrunner & Harer, "Computational Topology", 2010, §III.2 (Čech complexes) and §VII.1
 * (the reduction). Deliberately naive: n³ triangles, meant for n ≤ 12 or so.
 */
import type { Diagram } from '../../src/core/diagram.js';
import { complexPersistence } from '../../src/homology/filtered-complex.js';

/** Radius of the smallest disc enclosing points a, b, c (row-major x y). */
export function enclosingRadius3(c: ArrayLike<number>, a: number, b: number, v: number): number {
  const d2 = (i: number, j: number) => (c[2 * i] - c[2 * j]) ** 2 + (c[2 * i + 1] - c[2 * j + 1]) ** 2;
  const ab = d2(a, b);
  const bc = d2(b, v);
  const ca = d2(v, a);
  // Not acute (some angle ≥ 90°): the disc on the longest side encloses all three.
  const longest = Math.max(ab, bc, ca);
  if (longest >= ab + bc + ca - longest) return Math.sqrt(longest) / 2;
  // Acute: the circumcircle, R = abc / (4 · area).
  const area =
    Math.abs(
      (c[2 * b] - c[2 * a]) * (c[2 * v + 1] - c[2 * a + 1]) -
        (c[2 * v] - c[2 * a]) * (c[2 * b + 1] - c[2 * a + 1]),
    ) / 2;
  return Math.sqrt(ab * bc * ca) / (4 * area);
}

/** H0 and H1 of the Čech filtration (radii) of `count` planar points. */
export function naiveCechDiagrams(coords: ArrayLike<number>, count: number): Diagram[] {
  const edges: number[] = [];
  const edgeValues: number[] = [];
  const triangles: number[] = [];
  const triangleValues: number[] = [];
  for (let i = 0; i < count; i++) {
    for (let j = i + 1; j < count; j++) {
      edges.push(i, j);
      edgeValues.push(Math.hypot(coords[2 * i] - coords[2 * j], coords[2 * i + 1] - coords[2 * j + 1]) / 2);
      for (let k = j + 1; k < count; k++) {
        triangles.push(i, j, k);
        triangleValues.push(enclosingRadius3(coords, i, j, k));
      }
    }
  }
  const vertices = Int32Array.from({ length: count }, (_, i) => i);
  return complexPersistence(
    {
      simplices: [vertices, Int32Array.from(edges), Int32Array.from(triangles)],
      values: [new Float64Array(count), Float64Array.from(edgeValues), Float64Array.from(triangleValues)],
    },
    1,
  );
}
