import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { NO_EDGE, neighbourLists, tableEdges } from '../../src/homology/neighbour-lists.js';
import { condensedIndex } from '../../src/homology/simplex-index.js';

describe('tableEdges', () => {
  it('lists the edges by rank, ties by decreasing condensed index, and each row by rank', () => {
    const rng = new Random(3);
    const n = 23;
    const rankOf = new Int32Array(n * n).fill(NO_EDGE);
    const want: Array<[number, number, number]> = [];
    for (let i = 0; i < n; i++)
      for (let j = i + 1; j < n; j++) {
        if (rng.next() < 0.3) continue;
        const r = rng.int(15); // many ties
        rankOf[i * n + j] = r;
        rankOf[j * n + i] = r;
        want.push([i, j, r]);
      }
    want.sort((a, b) => a[2] - b[2] || condensedIndex(b[0], b[1], n) - condensedIndex(a[0], a[1], n));
    const { lists, ranks } = tableEdges(n, rankOf);
    expect(Array.from(lists.low)).toEqual(want.map((e) => e[0]));
    expect(Array.from(lists.high)).toEqual(want.map((e) => e[1]));
    expect(Array.from(ranks)).toEqual(want.map((e) => e[2]));
    // The same lists as built from the condensed indices.
    const again = neighbourLists(
      n,
      Int32Array.from(want, (e) => condensedIndex(e[0], e[1], n)),
      ranks,
    );
    expect(again).toEqual(lists);
    for (let v = 0; v < n; v++) {
      const row = Array.from(lists.rank.subarray(lists.start[v], lists.start[v + 1]));
      expect(row).toEqual([...row].sort((a, b) => a - b));
      for (let p = lists.start[v]; p < lists.start[v + 1]; p++)
        expect(rankOf[v * n + lists.vertex[p]]).toBe(lists.rank[p]);
      expect(lists.start[v + 1] - lists.start[v]).toBe(want.filter((e) => e[0] === v || e[1] === v).length);
    }
  });
});
