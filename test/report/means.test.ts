import { describe, expect, it } from 'vitest';
import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { evaluate, gridPoints } from '../../src/landscape/index.js';
import { classMeans, classStacks, sharedGrid } from '../../src/report/means.js';

function set(sample: string, label: string, h1: Array<[number, number]>): DiagramSet {
  return { sample, label, diagrams: [makeDiagram(0, [[0, Infinity]]), makeDiagram(1, h1)] };
}

describe('classMeans', () => {
  it('gives the pointwise mean of the tents in a hand-worked example', () => {
    // Chazal, Fasy, Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014: the mean
    // landscape is the pointwise mean; λ_1 of {(0, 2)} is the tent peaking 1 at t = 1, of {(0, 4)} the tent
    // peaking 2 at t = 2. Worked by hand: mean at t = 1 is (1 + 1)/2 = 1, at t = 2 (0 + 2)/2 = 1,
    // at t = 3 (0 + 1)/2 = 0.5.
    const sets = [set('a', 'x', [[0, 2]]), set('b', 'x', [[0, 4]])];
    const [h1] = classMeans(sets, { degrees: [1], depth: 2, gridSize: 5, band: { draws: 50 } });
    expect(h1.grid).toEqual({ start: 0, stop: 4, count: 5 });
    const mean = h1.classes[0].band.mean;
    expect(Array.from(mean.subarray(0, 5))).toEqual([0, 1, 1, 0.5, 0]);
    expect(Array.from(mean.subarray(5, 10))).toEqual([0, 0, 0, 0, 0]);
    const exact = h1.classes[0].exact;
    expect(exact && evaluate(exact, 1, 1.5)).toBeCloseTo((1.5 + 0.5) / 2 + 0, 12);
  });

  it('has a sampled mean equal to the exact mean evaluated on the grid', () => {
    // Sampling is linear, so the mean of sampled landscapes is the exact mean sampled (Chazal et al. 2014, the
    // landscape is a point of a vector space and evaluation at t is a linear functional).
    const random = new Random(4);
    const sets: DiagramSet[] = [];
    for (let i = 0; i < 24; i++) {
      const pairs: Array<[number, number]> = [];
      for (let p = 0; p < 1 + random.int(4); p++) {
        const b = random.uniform(0, 1);
        pairs.push([b, b + random.uniform(0.1, 1)]);
      }
      sets.push(set(`s${i}`, i % 2 === 0 ? 'even' : 'odd', pairs));
    }
    const means = classMeans(sets, { degrees: [0, 1], depth: 3, gridSize: 40, band: { draws: 100 } });
    expect(means.map((m) => m.degree)).toEqual([0, 1]);
    const h1 = means[1];
    const t = gridPoints(h1.grid);
    for (const c of h1.classes) {
      expect(c.samples).toBe(12);
      for (let k = 1; k <= 3; k++) {
        for (let j = 0; j < t.length; j++) {
          expect(c.band.mean[(k - 1) * t.length + j]).toBeCloseTo(
            c.exact ? evaluate(c.exact, k, t[j]) : Number.NaN,
            10,
          );
        }
      }
    }
  });

  it('shares one grid across classes, spanning every finite pair, and drops essential classes by default', () => {
    const sets = [set('a', 'p', [[0.5, 1]]), set('b', 'q', [[0.2, 3]])];
    expect(sharedGrid(sets, 1, 10)).toEqual({ start: 0.2, stop: 3, count: 10 });
    // H0 has only the essential class: no finite pairs, so a unit grid and all-zero landscapes.
    const stacks = classStacks(sets, 0, sharedGrid(sets, 0, 4), 1);
    expect(stacks.map((s) => s.label)).toEqual(['p', 'q']);
    expect(Array.from(stacks[0].stack.values)).toEqual([0, 0, 0, 0]);
  });
});
