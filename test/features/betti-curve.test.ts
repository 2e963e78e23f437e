import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { BettiCurveVectorizer, bettiCurveInto, gridPoints } from '../../src/features/betti-curve.js';
import { leaked, randomSets, set, TRAIN, twoFiltrations } from './diagram-fixtures.js';

describe('BettiCurveVectorizer', () => {
  it('counts the bars alive at each grid point on a hand-checked diagram', () => {
    // β(t) = #{pairs with birth ≤ t < death} (Zomorodian & Carlsson, "Computing persistent homology", 2005:
    // the barcode's bars alive at t span the homology at t). H1 bars [0, 2), [1, 3), [1, 1.5), checked by hand
    // at t = 0, 0.5, …, 3: 1, 1, 3, 2, 1, 1, 0 (t = 1.5 is the death of the short bar, so it is not counted).
    const v = new BettiCurveVectorizer({ degrees: [1], gridSize: 7, range: { start: 0, stop: 3 } });
    const x = v.fitTransform([
      set(
        'a',
        [],
        [
          [0, 2],
          [1, 3],
          [1, 1.5],
        ],
      ),
    ]);
    expect([...x.data]).toEqual([1, 1, 3, 2, 1, 1, 0]);
    expect(v.featureNames()).toEqual([
      'H1/betti/t=0.0000',
      'H1/betti/t=0.5000',
      'H1/betti/t=1.0000',
      'H1/betti/t=1.5000',
      'H1/betti/t=2.0000',
      'H1/betti/t=2.5000',
      'H1/betti/t=3.0000',
    ]);
  });

  it('equals direct counting on random diagrams with ties at grid points', () => {
    // The definition above, counted pair by pair (property test; births and deaths often fall on the grid).
    fc.assert(
      fc.property(
        fc.array(fc.tuple(fc.integer({ min: 0, max: 12 }), fc.integer({ min: 0, max: 12 })), {
          maxLength: 30,
        }),
        fc.integer({ min: 2, max: 13 }),
        (pairs, count) => {
          const finite = pairs.map(([a, b]): [number, number] => [Math.min(a, b) / 4, Math.max(a, b) / 4]);
          const d = makeDiagram(1, finite);
          const t = gridPoints({ start: 0, stop: 3, count });
          const out = new Float64Array(count);
          bettiCurveInto(d.births, d.deaths, t, out, 0);
          for (let j = 0; j < count; j++) {
            const expected = finite.filter(([b, e]) => b <= t[j] && t[j] < e).length;
            expect(out[j]).toBe(expected);
          }
        },
      ),
      { numRuns: 300 },
    );
  });

  it('learns each channel’s range from the training samples only (a test-sample change cannot move it)', () => {
    const sets = randomSets(30, 5);
    const a = new BettiCurveVectorizer({ gridSize: 10 }).fit(sets, TRAIN);
    const b = new BettiCurveVectorizer({ gridSize: 10 }).fit(leaked(sets), TRAIN);
    expect(b.state).toEqual(a.state);
    expect([...b.transform(leaked(sets), TRAIN).data]).toEqual([...a.transform(sets, TRAIN).data]);
    // The rule: smallest training birth to the 0.99 quantile of the training deaths (H0 births are all 0).
    expect(a.state!.grids[0].grid.start).toBe(0);
    expect(a.state!.grids[0].grid.stop).toBeLessThanOrEqual(1);
    expect(a.state!.grids[0].grid.stop).toBeGreaterThan(0.9);
  });

  it('has one block per (filtration, degree) channel, named by the channel', () => {
    const sets = twoFiltrations(randomSets(25, 3));
    const v = new BettiCurveVectorizer({ gridSize: 4 }).fit(sets, TRAIN);
    expect(v.state!.grids.map((g) => g.channel)).toEqual([
      { degree: 0, filtration: 'height:1:0' },
      { degree: 1, filtration: 'height:1:0' },
      { degree: 0, filtration: 'radial:0:0' },
      { degree: 1, filtration: 'radial:0:0' },
    ]);
    const names = v.featureNames();
    expect(names.length).toBe(16);
    expect(names[0]).toMatch(/^height:1:0\/H0\/betti\/t=/);
    expect(names[12]).toMatch(/^radial:0:0\/H1\/betti\/t=/);
    // The doubled filtration's grid is twice as long.
    expect(v.state!.grids[2].grid.stop).toBeCloseTo(2 * v.state!.grids[0].grid.stop, 12);
    expect(v.transform(sets).cols).toBe(16);
  });

  it('round-trips through JSON with identical features and refuses foreign JSON', () => {
    const sets = twoFiltrations(randomSets(25, 7));
    const v = new BettiCurveVectorizer({ gridSize: 6, infinite: { mode: 'clip', value: 1.5 } }).fit(sets);
    const again = BettiCurveVectorizer.fromJSON(JSON.parse(JSON.stringify(v.toJSON())));
    expect([...again.transform(sets).data]).toEqual([...v.transform(sets).data]);
    expect(again.featureNames()).toEqual(v.featureNames());
    expect(() => BettiCurveVectorizer.fromJSON({ kind: 'landform.betti-curves', format: 3 })).toThrow(
      /format 3/,
    );
    expect(() => BettiCurveVectorizer.fromJSON({ kind: 'other' })).toThrow(/not a saved Betti curve/);
  });

  it('counts a clipped essential class up to its clip value and drops it by default', () => {
    const s = [set('a', [[0, Infinity]], [])];
    const range = { start: 0, stop: 2 };
    const dropped = new BettiCurveVectorizer({ degrees: [0], gridSize: 3, range }).fitTransform(s);
    const clipped = new BettiCurveVectorizer({
      degrees: [0],
      gridSize: 3,
      range,
      infinite: { mode: 'clip', value: 1.5 },
    }).fitTransform(s);
    expect([...dropped.data]).toEqual([0, 0, 0]);
    expect([...clipped.data]).toEqual([1, 1, 0]);
  });
});
