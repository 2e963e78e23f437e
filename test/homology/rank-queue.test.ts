import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { RankQueue } from '../../src/homology/rank-queue.js';

/**
 * Reference: a plain multiset kept as a list; the pivot is the entry of smallest rank, ties to the largest
 * index, among those of odd multiplicity (the working column of a Z/2 reduction; Edelsbrunner & Harer,
 * "Computational Topology", 2010, section VII.1).
 */
function naivePivot(entries: Array<[number, number]>): [number, number] | undefined {
  const counts = new Map<string, number>();
  for (const [r, i] of entries) counts.set(`${r},${i}`, (counts.get(`${r},${i}`) ?? 0) + 1);
  const odd = [...counts]
    .filter(([, c]) => c % 2 === 1)
    .map(([k]) => k.split(',').map(Number) as [number, number]);
  odd.sort((a, b) => a[0] - b[0] || b[1] - a[1]);
  return odd[0];
}

describe('RankQueue', () => {
  it('pops the first entry of odd multiplicity, in filtration order, with pushes after each pop', () => {
    const rng = new Random(17);
    const queue = new RankQueue(40);
    for (let trial = 0; trial < 200; trial++) {
      const lowest = rng.int(10);
      queue.clear(lowest);
      let entries: Array<[number, number]> = [];
      let floor: [number, number] = [lowest, Number.POSITIVE_INFINITY];
      const push = (count: number): void => {
        for (let k = 0; k < count; k++) {
          // Never before the last pivot: same rank with a smaller index, or a later rank.
          const rank = floor[0] + rng.int(4);
          const index = rank === floor[0] ? rng.int(Math.min(floor[1], 12)) : rng.int(12);
          if (rank === floor[0] && !(index < floor[1])) continue;
          const times = 1 + rng.int(3);
          for (let t = 0; t < times; t++) {
            queue.push(rank, index);
            entries.push([rank, index]);
          }
        }
      };
      push(1 + rng.int(15));
      for (let step = 0; step < 30; step++) {
        const want = naivePivot(entries);
        const got = queue.popPivot();
        expect(got).toBe(want !== undefined);
        if (!want) break;
        expect([queue.pivotRank, queue.pivotIndex]).toEqual(want);
        // Everything up to the pivot is gone from the column (cancelled or popped).
        entries = entries.filter(([r, i]) => r > want[0] || (r === want[0] && i < want[1]));
        floor = want;
        push(rng.int(6));
      }
    }
  });

  it('is empty after clear, and a zero column (all entries paired) pops nothing', () => {
    const queue = new RankQueue(10);
    queue.clear(2);
    expect(queue.popPivot()).toBe(false);
    queue.push(3, 7);
    queue.push(5, 1);
    queue.push(3, 7);
    queue.push(5, 1);
    expect(queue.popPivot()).toBe(false);
    queue.clear(0);
    queue.push(4, 2);
    expect(queue.popPivot()).toBe(true);
    expect([queue.pivotRank, queue.pivotIndex]).toEqual([4, 2]);
  });
});
