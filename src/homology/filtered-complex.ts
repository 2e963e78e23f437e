/**
 * Persistence of a small explicit filtered simplicial complex by the standard column reduction over Z/2
 * with clearing (Edelsbrunner, Letscher & Zomorodian, "Topological persistence and simplification", 2002;
 * Chen & Kerber, "Persistent homology computation with a twist", 2011).
 *
 * Meant for complexes of up to some thousands of simplices: it is the reference the alpha and DTM code is
 * checked against in the tests, and it reduces any complex the caller can list. Simplices are sorted by
 * (value, dimension, position in the input), so a face always comes before its cofaces when values are
 * monotone (a face's value ≤ its coface's).
 */
import { type Diagram, makeDiagram } from '../core/diagram.js';

export interface FilteredComplex {
  /** `simplices[d]` holds the d-simplices as sorted vertex lists, flattened (d + 1 entries each). */
  simplices: Int32Array[];
  /** `values[d][s]` is the filtration value of the s-th d-simplex. */
  values: Float64Array[];
}

/**
 * Diagrams of degrees 0..maxDegree of a filtered complex. Pairs of zero persistence are left out; a class
 * never killed has death +Infinity (meaningful only below the top dimension listed).
 */
export function complexPersistence(complex: FilteredComplex, maxDegree: number): Diagram[] {
  const top = complex.simplices.length - 1;
  // Global order of all simplices.
  const dimOf: number[] = [];
  const idxOf: number[] = [];
  const simplexValue: number[] = [];
  for (let d = 0; d <= top; d++) {
    const n = complex.values[d].length;
    for (let s = 0; s < n; s++) {
      dimOf.push(d);
      idxOf.push(s);
      simplexValue.push(complex.values[d][s]);
    }
  }
  const total = dimOf.length;
  const order = Array.from({ length: total }, (_, i) => i);
  order.sort((a, b) => simplexValue[a] - simplexValue[b] || dimOf[a] - dimOf[b] || a - b);
  const position = new Int32Array(total);
  for (let p = 0; p < total; p++) position[order[p]] = p;
  const key = (d: number, s: number): string =>
    Array.from(complex.simplices[d].subarray(s * (d + 1), (s + 1) * (d + 1))).join(',');
  const positionByKey = new Map<string, number>();
  for (let g = 0; g < total; g++) positionByKey.set(key(dimOf[g], idxOf[g]), position[g]);

  // Boundary columns, indexed by position; rows are positions too, kept ascending.
  const columns: number[][] = new Array(total);
  const dimAt = new Int32Array(total);
  const valueAt = new Float64Array(total);
  for (let g = 0; g < total; g++) {
    const p = position[g];
    const d = dimOf[g];
    dimAt[p] = d;
    valueAt[p] = simplexValue[g];
    const col: number[] = [];
    if (d > 0) {
      const verts = Array.from(complex.simplices[d].subarray(idxOf[g] * (d + 1), (idxOf[g] + 1) * (d + 1)));
      for (let drop = 0; drop <= d; drop++) {
        const face = verts.filter((_, i) => i !== drop).join(',');
        const fp = positionByKey.get(face);
        if (fp === undefined)
          throw new Error(`face ${face} of simplex ${verts.join(',')} is missing from the complex`);
        col.push(fp);
      }
      col.sort((a, b) => a - b);
    }
    columns[p] = col;
  }

  const pivotOwner = new Int32Array(total).fill(-1);
  const paired = new Uint8Array(total);
  const pairs: Array<Array<[number, number]>> = Array.from({ length: maxDegree + 1 }, () => []);
  // Reduce from the top dimension down so that clearing applies (Chen & Kerber 2011).
  for (let d = top; d >= 1; d--) {
    // Invariant: every column of dimension > d and the columns of dimension d before p are reduced.
    for (let p = 0; p < total; p++) {
      if (dimAt[p] !== d) continue;
      if (paired[p]) {
        columns[p] = []; // cleared: p is the birth of a pair, so its column reduces to zero
        continue;
      }
      let col = columns[p];
      while (col.length > 0) {
        const low = col[col.length - 1];
        const owner = pivotOwner[low];
        if (owner < 0) break;
        col = addColumns(col, columns[owner]);
      }
      columns[p] = col;
      if (col.length > 0) {
        const low = col[col.length - 1];
        pivotOwner[low] = p;
        paired[low] = 1;
        paired[p] = 1;
        const degree = d - 1;
        if (degree <= maxDegree && valueAt[p] > valueAt[low]) pairs[degree].push([valueAt[low], valueAt[p]]);
      }
    }
  }
  for (let p = 0; p < total; p++) {
    const d = dimAt[p];
    if (!paired[p] && d <= maxDegree && d < top + 1) pairs[d].push([valueAt[p], Infinity]);
  }
  return pairs.map((list, degree) => makeDiagram(degree, list));
}

/** Symmetric difference of two ascending lists. */
function addColumns(a: number[], b: number[]): number[] {
  const out: number[] = [];
  let i = 0;
  let j = 0;
  // Invariant: out is the symmetric difference of a[0, i) and b[0, j), ascending.
  while (i < a.length && j < b.length) {
    if (a[i] < b[j]) out.push(a[i++]);
    else if (a[i] > b[j]) out.push(b[j++]);
    else {
      i++;
      j++;
    }
  }
  while (i < a.length) out.push(a[i++]);
  while (j < b.length) out.push(b[j++]);
  return out;
}
