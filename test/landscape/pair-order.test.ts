import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { sortPairs } from '../../src/landscape/pair-order.js';

function bySpec(births: Float64Array, deaths: Float64Array, order: number[]): number[] {
  return [...order].sort((x, y) => births[x] - births[y] || deaths[y] - deaths[x]);
}

describe('sortPairs', () => {
  it('orders by birth ascending, then death descending, like a comparison sort', () => {
    const value = fc.oneof(
      fc.double({ noNaN: true, noDefaultInfinity: true, min: -1e6, max: 1e6 }),
      fc.integer({ min: -3, max: 3 }).map((x) => x / 2),
    );
    fc.assert(
      fc.property(fc.array(fc.tuple(value, value), { maxLength: 80 }), (pairs) => {
        const births = Float64Array.from(pairs, (p) => p[0]);
        const deaths = Float64Array.from(pairs, (p) => p[1]);
        const order = Uint32Array.from(pairs.keys());
        const got = [...sortPairs(births, deaths, order)];
        const want = bySpec(births, deaths, [...order]);
        // Same sequence of (birth, death) values (indices of identical pairs may differ).
        return (
          got.every((g, i) => births[g] === births[want[i]] && deaths[g] === deaths[want[i]]) &&
          new Set(got).size === got.length
        );
      }),
      { numRuns: 300 },
    );
  });

  it('handles long runs of equal births and negative values', () => {
    const n = 500;
    const births = new Float64Array(n).map((_, i) => (i % 3 === 0 ? 0 : -i));
    const deaths = new Float64Array(n).map((_, i) => (i * 7919) % 101);
    const got = [
      ...sortPairs(
        births,
        deaths,
        Uint32Array.from({ length: n }, (_, i) => i),
      ),
    ];
    const want = bySpec(
      births,
      deaths,
      Array.from({ length: n }, (_, i) => i),
    );
    expect(got.map((i) => [births[i], deaths[i]])).toEqual(want.map((i) => [births[i], deaths[i]]));
  });
});
