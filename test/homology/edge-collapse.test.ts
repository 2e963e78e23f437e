import { describe, expect, it } from 'vitest';
import type { Diagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { drawSphere } from '../../src/demo/scenarios/shapes.js';
import { collapseEdges, collapseFiltration } from '../../src/homology/edge-collapse.js';
import { pairwiseDistances } from '../../src/homology/metric.js';
import { NO_EDGE, tableEdges } from '../../src/homology/neighbour-lists.js';
import { ripsPersistence } from '../../src/homology/rips.js';
import { UnionFind } from '../../src/homology/union-find.js';

/** A dense rank table of n vertices with the given edges at the given ranks (NO_EDGE elsewhere). */
function table(n: number, edges: Array<[number, number, number]>): Int32Array {
  const rankOf = new Int32Array(n * n).fill(NO_EDGE);
  for (const [i, j, r] of edges) {
    rankOf[i * n + j] = r;
    rankOf[j * n + i] = r;
  }
  return rankOf;
}

function edgesOf(n: number, rankOf: Int32Array): Array<[number, number]> {
  const out: Array<[number, number]> = [];
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) if (rankOf[i * n + j] !== NO_EDGE) out.push([i, j]);
  return out;
}

function pairsOf(d: Diagram): Array<[number, number]> {
  return Array.from(d.births, (b, i): [number, number] => [b, d.deaths[i]]).sort(
    (p, q) => p[0] - q[0] || p[1] - q[1],
  );
}

// Boissonnat & Pritam, "Edge collapse and persistence of flag complexes", 2020: removing an edge dominated by
// a vertex (N[u] ∩ N[v] ⊆ N[w]) is a collapse of the flag complex, so it keeps its homotopy type.
describe('collapseEdges on a graph at a single value', () => {
  it('collapses a complete graph (a simplex, contractible) to a spanning tree', () => {
    for (const n of [3, 4, 7, 20]) {
      const all: Array<[number, number, number]> = [];
      for (let i = 0; i < n; i++) for (let j = i + 1; j < n; j++) all.push([i, j, 0]);
      const rankOf = table(n, all);
      const { lists, ranks } = tableEdges(n, rankOf);
      const { kept, moved } = collapseEdges(n, rankOf, lists, ranks);
      const left = edgesOf(n, rankOf);
      expect(kept).toBe(n - 1);
      expect(moved).toBe(all.length - (n - 1));
      expect(left).toHaveLength(n - 1);
      // n − 1 edges joining all n vertices: a tree.
      const uf = new UnionFind(n);
      for (const [i, j] of left) {
        const a = uf.find(i);
        const b = uf.find(j);
        expect(a).not.toBe(b);
        uf.link(a, b, a);
      }
    }
  });

  it('leaves a cycle alone: without triangles no edge is dominated', () => {
    for (const n of [4, 5, 9]) {
      const rankOf = table(
        n,
        Array.from({ length: n }, (_, v): [number, number, number] => [v, (v + 1) % n, 0]),
      );
      const before = rankOf.slice();
      const { lists, ranks } = tableEdges(n, rankOf);
      expect(collapseEdges(n, rankOf, lists, ranks)).toEqual({ kept: n, moved: 0 });
      expect(rankOf).toEqual(before);
    }
  });

  it('removes the diagonal of a square with its centre joined to all corners (a cone)', () => {
    // Square 0-1-2-3, diagonal 0-2, centre 4 joined to all: the diagonal is dominated by 4.
    const square: Array<[number, number, number]> = [
      [0, 1, 0],
      [1, 2, 0],
      [2, 3, 0],
      [0, 3, 0],
      [0, 2, 0],
      [0, 4, 0],
      [1, 4, 0],
      [2, 4, 0],
      [3, 4, 0],
    ];
    const rankOf = table(5, square);
    const { lists, ranks } = tableEdges(5, rankOf);
    collapseEdges(5, rankOf, lists, ranks);
    expect(rankOf[0 * 5 + 2]).toBe(NO_EDGE);
    // A cone over a 4-cycle is contractible: what is left is a tree on the 5 vertices.
    expect(edgesOf(5, rankOf)).toHaveLength(4);
  });
});

describe('collapseFiltration on a sampled sphere', () => {
  it('keeps the diagrams of degrees 0–2, moves edges only later, removes many and refines the ranks', () => {
    const n = 90;
    const c = drawSphere(n, 0.02, new Random(404));
    const edges = pairwiseDistances(c, n, 3);
    const plain = ripsPersistence(n, edges, { maxDegree: 2, collapse: false });
    const collapsed = ripsPersistence(n, edges, { maxDegree: 2, collapse: true });
    for (let d = 0; d <= 2; d++) expect(pairsOf(collapsed[d])).toEqual(pairsOf(plain[d]));
    // The sphere's void: one long H2 bar (a textbook fact about the sphere), in both.
    expect(plain[2].births.length).toBeGreaterThan(0);
    const long = pairsOf(collapsed[2]).filter(([b, d]) => d - b > 0.5);
    expect(long).toHaveLength(1);

    // The collapse itself on the rank table of all edges.
    const order = Array.from(edges.keys()).sort((a, b) => edges[a] - edges[b] || b - a);
    const rankOf = new Int32Array(n * n).fill(NO_EDGE);
    for (let k = 0; k < order.length; k++) {
      const e = order[k];
      let j = 1;
      while (((j + 1) * j) / 2 <= e) j++;
      const i = e - (j * (j - 1)) / 2;
      rankOf[i * n + j] = k;
      rankOf[j * n + i] = k;
    }
    const before = rankOf.slice();
    const start = tableEdges(n, rankOf);
    const after = collapseFiltration(n, rankOf, start.lists, start.ranks);
    let removed = 0;
    for (let p = 0; p < n * n; p++) {
      if (rankOf[p] === NO_EDGE) {
        if (before[p] !== NO_EDGE) removed++;
        continue;
      }
      // Refined ranks are positions; read back through levelOf they are the collapsed ranks.
      expect(after.levelOf[rankOf[p]]).toBeGreaterThanOrEqual(before[p]);
    }
    expect(removed / 2 + after.ranks.length).toBe(order.length);
    // One rank per edge, in filtration order, the collapsed ranks never decreasing along it.
    expect(Array.from(after.ranks)).toEqual(Array.from(after.ranks, (_, k) => k));
    for (let k = 1; k < after.levelOf.length; k++)
      expect(after.levelOf[k]).toBeGreaterThanOrEqual(after.levelOf[k - 1]);
    expect(after.ranks.length).toBeLessThan(0.8 * order.length);
  });
});
