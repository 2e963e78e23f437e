/**
 * An independent, deliberately plain implementation of persistent homology for tests: build every simplex of
 * the Vietoris–Rips complex up to dimension maxDegree + 1 as a vertex list, sort by (value, dimension,
 * vertices), and run the standard column reduction over Z/2 on the explicit boundary matrix
 * (Edelsbrunner & Harer, "Computational Topology: An Introduction", 2010, section VII.1).
 */
export interface NaivePairs {
  /** Finite pairs with death > birth, per degree, sorted by (birth, death). */
  finite: Array<Array<[number, number]>>;
  /** Number of essential classes per degree. */
  essential: number[];
}

export function naiveRips(
  n: number,
  distance: (i: number, j: number) => number,
  maxDegree: number,
  options: { maxScale?: number; vertexValues?: number[] } = {},
): NaivePairs {
  const maxScale = options.maxScale ?? Infinity;
  const vv = options.vertexValues ?? new Array<number>(n).fill(0);
  interface Simplex {
    vertices: number[];
    value: number;
  }
  const simplices: Simplex[] = [];
  const build = (prefix: number[], start: number): void => {
    if (prefix.length > 0) {
      let value = 0;
      for (const v of prefix) value = Math.max(value, vv[v]);
      for (let a = 0; a < prefix.length; a++)
        for (let b = a + 1; b < prefix.length; b++) value = Math.max(value, distance(prefix[a], prefix[b]));
      if (value > maxScale) return; // every coface is at least as large
      simplices.push({ vertices: prefix.slice(), value });
    }
    if (prefix.length === maxDegree + 2) return;
    for (let v = start; v < n; v++) {
      prefix.push(v);
      build(prefix, v + 1);
      prefix.pop();
    }
  };
  build([], 0);
  simplices.sort((x, y) => {
    if (x.value !== y.value) return x.value - y.value;
    if (x.vertices.length !== y.vertices.length) return x.vertices.length - y.vertices.length;
    for (let k = 0; k < x.vertices.length; k++)
      if (x.vertices[k] !== y.vertices[k]) return x.vertices[k] - y.vertices[k];
    return 0;
  });
  const position = new Map<string, number>();
  simplices.forEach((s, i) => {
    position.set(s.vertices.join(','), i);
  });
  // Boundary columns as sets of row positions.
  const columns: Set<number>[] = simplices.map((s) => {
    const col = new Set<number>();
    if (s.vertices.length > 1) {
      for (let drop = 0; drop < s.vertices.length; drop++) {
        const face = s.vertices.filter((_, k) => k !== drop).join(',');
        col.add(position.get(face) as number);
      }
    }
    return col;
  });
  const low = (col: Set<number>): number => (col.size === 0 ? -1 : Math.max(...col));
  const ownerOfLow = new Map<number, number>();
  const paired = new Set<number>();
  const finite: Array<Array<[number, number]>> = [];
  for (let d = 0; d <= maxDegree; d++) finite.push([]);
  for (let j = 0; j < columns.length; j++) {
    let l = low(columns[j]);
    while (l >= 0 && ownerOfLow.has(l)) {
      const other = columns[ownerOfLow.get(l) as number];
      for (const x of other) {
        if (columns[j].has(x)) columns[j].delete(x);
        else columns[j].add(x);
      }
      l = low(columns[j]);
    }
    if (l >= 0) {
      ownerOfLow.set(l, j);
      paired.add(l);
      paired.add(j);
      const degree = simplices[l].vertices.length - 1;
      if (degree <= maxDegree && simplices[j].value > simplices[l].value)
        finite[degree].push([simplices[l].value, simplices[j].value]);
    }
  }
  const essential = new Array<number>(maxDegree + 1).fill(0);
  for (let j = 0; j < columns.length; j++) {
    const degree = simplices[j].vertices.length - 1;
    if (degree <= maxDegree && !paired.has(j) && columns[j].size === 0) essential[degree]++;
  }
  for (const list of finite) list.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  return { finite, essential };
}

/** A cell of an explicit filtered complex: its value, dimension and the numbers of its facets. */
export interface NaiveCell {
  value: number;
  dim: number;
  faces: number[];
}

/**
 * The standard column reduction over Z/2 of an explicit filtered complex, cells ordered by (value,
 * dimension, number) (Edelsbrunner & Harer, "Computational Topology", 2010, section VII.1).
 */
export function naiveReduce(cells: NaiveCell[], maxDegree: number): NaivePairs {
  const order = cells.map((_, i) => i);
  order.sort((a, b) => cells[a].value - cells[b].value || cells[a].dim - cells[b].dim || a - b);
  const position = new Int32Array(cells.length);
  order.forEach((c, p) => {
    position[c] = p;
  });
  const columns = order.map((c) => new Set(cells[c].faces.map((f) => position[f])));
  const low = (col: Set<number>): number => (col.size === 0 ? -1 : Math.max(...col));
  const ownerOfLow = new Map<number, number>();
  const paired = new Set<number>();
  const finite: Array<Array<[number, number]>> = [];
  for (let d = 0; d <= maxDegree; d++) finite.push([]);
  for (let j = 0; j < columns.length; j++) {
    let l = low(columns[j]);
    while (l >= 0 && ownerOfLow.has(l)) {
      for (const x of columns[ownerOfLow.get(l) as number]) {
        if (columns[j].has(x)) columns[j].delete(x);
        else columns[j].add(x);
      }
      l = low(columns[j]);
    }
    if (l >= 0) {
      ownerOfLow.set(l, j);
      paired.add(l);
      const lc = cells[order[l]];
      const jc = cells[order[j]];
      if (lc.dim <= maxDegree && jc.value > lc.value) finite[lc.dim].push([lc.value, jc.value]);
    }
  }
  const essential = new Array<number>(maxDegree + 1).fill(0);
  for (let j = 0; j < columns.length; j++) {
    const c = cells[order[j]];
    if (c.dim <= maxDegree && !paired.has(j) && columns[j].size === 0) essential[c.dim]++;
  }
  for (const list of finite) list.sort((a, b) => a[0] - b[0] || a[1] - b[1]);
  return { finite, essential };
}
