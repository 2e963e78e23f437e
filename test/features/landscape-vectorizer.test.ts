import { describe, expect, it } from 'vitest';
import type { DiagramSet } from '../../src/core/diagram.js';
import {
  LandscapeVectorizer,
  learnGrid,
  parseLandscapeFeatureName,
} from '../../src/features/landscape-vectorizer.js';
import { randomSets, set } from './diagram-fixtures.js';

describe('LandscapeVectorizer', () => {
  it('samples layers by the landscape definition on an explicit grid', () => {
    // λ_k(t) is the k-th largest of max(0, min(t − b, d − t)) over the pairs (Chazal, Fasy, Lecci,
    // Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014, section 2). Pairs (0,4) and (1,3), worked by hand
    // at t = 0, 1, 2, 3, 4: λ1 = 0,1,2,1,0; λ2 = 0,0,1,0,0.
    const v = new LandscapeVectorizer({ degrees: [1], depth: 2, gridSize: 5, range: { start: 0, stop: 4 } });
    const sets = [
      set(
        'a',
        [],
        [
          [0, 4],
          [1, 3],
        ],
      ),
    ];
    const x = v.fitTransform(sets);
    expect([...x.data]).toEqual([0, 1, 2, 1, 0, 0, 0, 1, 0, 0]);
    expect(v.featureNames().slice(0, 3)).toEqual(['H1/L1/t=0.0000', 'H1/L1/t=1.0000', 'H1/L1/t=2.0000']);
  });

  it('learns each degree’s range from the training samples only (a test-fold change cannot move it)', () => {
    const sets = randomSets(30, 5);
    const train = Int32Array.from({ length: 20 }, (_, i) => i);
    const _test = Int32Array.from({ length: 10 }, (_, i) => 20 + i);
    const a = new LandscapeVectorizer({ depth: 3, gridSize: 20 }).fit(sets, train);
    // Replace the test samples with diagrams ten times larger: were they seen by fit, the grid would stretch.
    const leaked = [...sets.slice(0, 20), ...randomSets(10, 9, 10)];
    const b = new LandscapeVectorizer({ depth: 3, gridSize: 20 }).fit(leaked, train);
    expect(b.state!.grids).toEqual(a.state!.grids);
    expect([...b.transform(leaked, train).data]).toEqual([...a.transform(sets, train).data]);
    // And the grid is the documented one: [min birth, 0.99 quantile of deaths] of the training pairs.
    const g1 = learnGrid(sets, train, 1, { mode: 'drop' }, 0.99, 20);
    expect(a.state!.grids[1].grid).toEqual(g1);
    const all = new LandscapeVectorizer({ depth: 3, gridSize: 20 }).fit(leaked);
    expect(all.state!.grids[0].grid.stop).toBeGreaterThan(2 * a.state!.grids[0].grid.stop);
  });

  it('names map back to (degree, layer, t)', () => {
    const sets = randomSets(8, 2);
    const v = new LandscapeVectorizer({ depth: 4, gridSize: 7 }).fit(sets);
    const names = v.featureNames();
    expect(names).toHaveLength(2 * 4 * 7);
    expect(new Set(names).size).toBe(names.length);
    for (const i of [0, 6, 7, 27, 28, 29, 55]) {
      const parsed = parseLandscapeFeatureName(names[i])!;
      const located = v.locate(i);
      expect(parsed.degree).toBe(located.degree);
      expect(parsed.layer).toBe(located.layer);
      expect(parsed.t).toBeCloseTo(located.t, 3);
    }
    expect(v.locate(28)).toMatchObject({ degree: 1, layer: 1 });
    expect(v.locate(28).t).toBe(v.state!.grids[1].grid.start);
  });

  it('standardises with training moments and round-trips through JSON', () => {
    const sets = randomSets(12, 4);
    const train = Int32Array.from([0, 1, 2, 3, 4, 5, 6, 7]);
    const v = new LandscapeVectorizer({
      depth: 2,
      gridSize: 10,
      standardize: true,
      infinite: { mode: 'clip', value: 1.5 },
    }).fit(sets, train);
    const x = v.transform(sets, train);
    // Each non-constant column of the training rows now has mean 0.
    let colMean = 0;
    for (let i = 0; i < x.rows; i++) colMean += x.data[i * x.cols + 5];
    expect(Math.abs(colMean / x.rows)).toBeLessThan(1e-9);
    const back = LandscapeVectorizer.fromJSON(JSON.parse(JSON.stringify(v.toJSON())));
    expect([...back.transform(sets).data]).toEqual([...v.transform(sets).data]);
    expect(() => LandscapeVectorizer.fromJSON({ kind: 'other' })).toThrow(/not a saved landscape vectoriser/);
    expect(() => LandscapeVectorizer.fromJSON({ ...v.toJSON(), format: 9 })).toThrow(/format 9/);
  });

  it('clip policy keeps the essential H0 class as a tent up to the clip value', () => {
    const sets = [set('a', [[0, Infinity]], [])];
    const v = new LandscapeVectorizer({
      degrees: [0],
      depth: 1,
      gridSize: 3,
      range: { start: 0, stop: 2 },
      infinite: { mode: 'clip', value: 2 },
    });
    expect([...v.fitTransform(sets).data]).toEqual([0, 1, 0]);
    const d = new LandscapeVectorizer({ degrees: [0], depth: 1, gridSize: 3, range: { start: 0, stop: 2 } });
    expect([...d.fitTransform(sets).data]).toEqual([0, 0, 0]);
  });
});

describe('LandscapeVectorizer with several filtrations (channels)', () => {
  /** Two samples' worth of diagrams from filtrations A and B, tagged as the homology stage tags them. */
  function tagged(a: DiagramSet, b: DiagramSet): DiagramSet {
    return {
      sample: a.sample,
      label: a.label,
      diagrams: [
        ...a.diagrams.map((d) => ({ ...d, filtration: 'height:1:0' })),
        ...b.diagrams.map((d) => ({ ...d, filtration: 'erosion' })),
      ],
    };
  }

  it('gives each filtration its own grid from the training rows and equals one vectoriser per filtration', () => {
    const a = randomSets(12, 3);
    const b = randomSets(12, 4, 5); // a filtration on another scale: its grid must not be A's
    const both = a.map((s, i) => tagged(s, b[i]));
    const train = Int32Array.from([0, 1, 2, 3, 4, 5, 6, 7]);
    const options = { degrees: [0, 1], depth: 2, gridSize: 6 };
    const v = new LandscapeVectorizer(options).fit(both, train);
    const va = new LandscapeVectorizer(options).fit(a, train);
    const vb = new LandscapeVectorizer(options).fit(b, train);
    expect(v.channels()).toEqual([
      { degree: 0, filtration: 'height:1:0' },
      { degree: 1, filtration: 'height:1:0' },
      { degree: 0, filtration: 'erosion' },
      { degree: 1, filtration: 'erosion' },
    ]);
    expect(v.state?.grids.map((g) => g.grid)).toEqual([
      ...(va.state?.grids.map((g) => g.grid) ?? []),
      ...(vb.state?.grids.map((g) => g.grid) ?? []),
    ]);
    const test = Int32Array.from([8, 9, 10, 11]);
    const m = v.transform(both, test);
    const ma = va.transform(a, test);
    const mb = vb.transform(b, test);
    expect(m.cols).toBe(ma.cols + mb.cols);
    for (let r = 0; r < test.length; r++) {
      expect(Array.from(m.data.subarray(r * m.cols, r * m.cols + ma.cols))).toEqual(
        Array.from(ma.data.subarray(r * ma.cols, (r + 1) * ma.cols)),
      );
      expect(Array.from(m.data.subarray(r * m.cols + ma.cols, (r + 1) * m.cols))).toEqual(
        Array.from(mb.data.subarray(r * mb.cols, (r + 1) * mb.cols)),
      );
    }
    // Names say the filtration, parse back, and the JSON round trip keeps the channels.
    const names = v.featureNames();
    expect(names[0]).toMatch(/^height:1:0\/H0\/L1\/t=/);
    expect(names[names.length - 1]).toMatch(/^erosion\/H1\/L2\/t=/);
    const last = parseLandscapeFeatureName(names[names.length - 1]);
    expect(last).toMatchObject({ filtration: 'erosion', degree: 1, layer: 2 });
    expect(v.locate(names.length - 1)).toMatchObject({ filtration: 'erosion', degree: 1, layer: 2 });
    expect(v.locate(names.length - 1).t).toBeCloseTo(last?.t ?? Number.NaN, 3);
    const back = LandscapeVectorizer.fromJSON(JSON.parse(JSON.stringify(v.toJSON())));
    expect(Array.from(back.transform(both, test).data)).toEqual(Array.from(m.data));
  });

  it('refuses samples filtered in a way it was not fitted on', () => {
    const a = randomSets(4, 5);
    const v = new LandscapeVectorizer({ degrees: [0, 1], depth: 1, gridSize: 3 }).fit(a);
    const other = a.map((s) => tagged(s, s));
    expect(() => v.transform(other)).toThrow(/filtration 'height:1:0'.*same --filtration/);
  });
});
