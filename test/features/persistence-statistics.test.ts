import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import {
  PersistenceStatistics,
  persistentEntropy,
  STATISTIC_NAMES,
  statisticsInto,
} from '../../src/features/persistence-statistics.js';
import { leaked, randomSets, set, TRAIN, twoFiltrations } from './diagram-fixtures.js';

function statsOf(pairs: Array<[number, number]>): Record<string, number> {
  const d = makeDiagram(1, pairs);
  const out = new Float64Array(STATISTIC_NAMES.length);
  statisticsInto(d.births, d.deaths, out, 0);
  return Object.fromEntries(STATISTIC_NAMES.map((n, i) => [n, out[i]]));
}

describe('PersistenceStatistics', () => {
  it('gives entropy ln k for k bars of equal length, whatever their length and place', () => {
    // Persistent entropy E = −Σ p_i ln p_i, p_i = ℓ_i / Σ ℓ (Rucco, Castiglione, Merelli, Pettini,
    // "Characterisation of the idiotypic immune network through persistent entropy", 2016): k equal
    // lifetimes give p_i = 1/k, so E = ln k, the largest entropy of k bars (Shannon's maximum).
    fc.assert(
      fc.property(
        fc.integer({ min: 1, max: 40 }),
        fc.double({ min: 0.01, max: 100, noNaN: true }),
        fc.array(fc.double({ min: -5, max: 5, noNaN: true }), { minLength: 40, maxLength: 40 }),
        (k, length, starts) => {
          const pairs = starts.slice(0, k).map((b): [number, number] => [b, b + length]);
          const d = makeDiagram(1, pairs);
          expect(persistentEntropy(d.births, d.deaths)).toBeCloseTo(Math.log(k), 10);
          const s = statsOf(pairs);
          expect(s.entropy).toBeCloseTo(Math.log(k), 10);
          expect(s.entropyRatio).toBeCloseTo(k > 1 ? 1 : 0, 10);
        },
      ),
      { numRuns: 200 },
    );
  });

  it('computes every summary of a hand-checked diagram', () => {
    // Bars [0, 1), [1, 3), [2, 6): lifetimes 1, 2, 4; births 0, 1, 2; deaths 1, 3, 6; midpoints 0.5, 2, 4.
    // Quantiles are type 7 (Hyndman & Fan, "Sample quantiles in statistical packages", 1996): q25 of three
    // sorted values is halfway between the first two. Entropy by the definition: p = 1/7, 2/7, 4/7.
    const s = statsOf([
      [0, 1],
      [1, 3],
      [2, 6],
    ]);
    expect(s.count).toBe(3);
    expect(s['lifetime/mean']).toBeCloseTo(7 / 3, 12);
    expect(s['lifetime/std']).toBeCloseTo(
      Math.sqrt(((1 - 7 / 3) ** 2 + (2 - 7 / 3) ** 2 + (4 - 7 / 3) ** 2) / 3),
      12,
    );
    expect([
      s['lifetime/min'],
      s['lifetime/q25'],
      s['lifetime/median'],
      s['lifetime/q75'],
      s['lifetime/max'],
    ]).toEqual([1, 1.5, 2, 3, 4]);
    expect([s['birth/mean'], s['death/max'], s['midpoint/median'], s['midpoint/min']]).toEqual([
      1, 6, 2, 0.5,
    ]);
    expect(s.total).toBe(7);
    const p = [1 / 7, 2 / 7, 4 / 7];
    expect(s.entropy).toBeCloseTo(-p.reduce((a, x) => a + x * Math.log(x), 0), 12);
    expect(Object.values(statsOf([])).every((v) => v === 0)).toBe(true);
  });

  it('learns only the channels, from the training samples, and names features by channel', () => {
    const sets = randomSets(30, 5);
    const a = new PersistenceStatistics().fit(sets, TRAIN);
    const b = new PersistenceStatistics().fit(leaked(sets), TRAIN);
    expect(b.state).toEqual(a.state);
    expect([...b.transform(leaked(sets), TRAIN).data]).toEqual([...a.transform(sets, TRAIN).data]);
    const names = a.featureNames();
    expect(names.length).toBe(2 * STATISTIC_NAMES.length);
    expect(names).toContain('H0/entropy');
    expect(names).toContain('H1/lifetime/mean');
    const tagged = new PersistenceStatistics({ degrees: [1] }).fit(twoFiltrations(sets), TRAIN);
    expect(tagged.featureNames()).toContain('radial:0:0/H1/entropy');
    expect(tagged.featureNames().length).toBe(2 * STATISTIC_NAMES.length);
  });

  it('round-trips through JSON with identical features', () => {
    const sets = twoFiltrations(randomSets(22, 2));
    const v = new PersistenceStatistics({ infinite: { mode: 'clip', value: 2 } }).fit(sets);
    const again = PersistenceStatistics.fromJSON(JSON.parse(JSON.stringify(v.toJSON())));
    expect([...again.transform(sets).data]).toEqual([...v.transform(sets).data]);
    expect(again.featureNames()).toEqual(v.featureNames());
    expect(() => PersistenceStatistics.fromJSON({ kind: 'landform.betti-curves', format: 1 })).toThrow(
      /not a saved persistence statistics/,
    );
    // A clipped essential H0 class counts as a bar [0, 2).
    const one = new PersistenceStatistics({ degrees: [0], infinite: { mode: 'clip', value: 2 } });
    expect(one.fitTransform([set('a', [[0, Infinity]], [])]).data[0]).toBe(1);
  });
});
