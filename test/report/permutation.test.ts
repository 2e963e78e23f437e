import { describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { contrastAll, permutationTest } from '../../src/report/permutation.js';
import { type GridSpec, type LandscapeStack, sampledNorm, stackLandscapes } from '../../src/report/stack.js';

const grid: GridSpec = { start: 0, stop: 3, count: 31 };
const depth = 2;

/** Landscapes of one-to-two-pair diagrams straight from the definition (Chazal et al. 2014), lifetimes scaled by `scale`. */
function group(random: Random, n: number, scale: number): LandscapeStack {
  const rows: Float64Array[] = [];
  const step = (grid.stop - grid.start) / (grid.count - 1);
  for (let i = 0; i < n; i++) {
    const size = 1 + random.int(2);
    const pairs: Array<[number, number]> = [];
    for (let p = 0; p < size; p++) {
      const b = random.uniform(0, 1);
      pairs.push([b, b + scale * random.uniform(0.4, 1.4)]);
    }
    const out = new Float64Array(depth * grid.count);
    for (let j = 0; j < grid.count; j++) {
      const t = grid.start + j * step;
      const tents = pairs.map(([b, d]) => Math.max(0, Math.min(t - b, d - t))).sort((x, y) => y - x);
      for (let k = 0; k < depth; k++) out[k * grid.count + j] = tents[k] ?? 0;
    }
    rows.push(out);
  }
  return stackLandscapes(rows, grid, depth);
}

describe('permutationTest', () => {
  it('gives near-uniform p-values under the null', () => {
    // Robinson & Turner, "Hypothesis testing for topological data analysis", 2017: under exchangeability
    // the permutation p-value (1 + #≥)/(1 + R) is (discretely) uniform, P(p ≤ u) ≤ u.
    const random = new Random(42);
    const runs = 200;
    const ps: number[] = [];
    for (let r = 0; r < runs; r++) {
      const a = group(random, 12, 1);
      const b = group(random, 15, 1);
      ps.push(permutationTest(a, b, { permutations: 99, seed: r + 1 }).p);
    }
    ps.sort((x, y) => x - y);
    // Kolmogorov–Smirnov distance to the uniform law on [0, 1].
    let ks = 0;
    for (let i = 0; i < runs; i++)
      ks = Math.max(ks, Math.abs((i + 1) / runs - ps[i]), Math.abs(i / runs - ps[i]));
    // Loose bound: the KS critical value at α = 0.001 for 200 draws is 1.95/√200 ≈ 0.138 (Smirnov's
    // asymptotic distribution, from memory), plus 0.01 for the p-value grid of 1/100.
    expect(ks).toBeLessThan(0.15);
    // Valid at 5%: at most about 5% + 3 binomial standard errors of the null p-values fall at or below 0.05.
    expect(ps.filter((p) => p <= 0.05).length / runs).toBeLessThan(
      0.05 + 3 * Math.sqrt((0.05 * 0.95) / runs),
    );
  });

  it('gives the smallest possible p-value under a clear difference', () => {
    // Robinson & Turner 2017: with a real difference in means the statistic of the true labelling exceeds
    // almost every relabelling; the smallest attainable p is 1/(1 + R).
    const random = new Random(9);
    const result = permutationTest(group(random, 20, 1), group(random, 20, 1.6), { permutations: 999 });
    expect(result.p).toBeLessThan(0.01);
    expect(result.p).toBeGreaterThanOrEqual(1 / 1000);
  });

  it('uses the Lp distance between the two sampled means as its statistic', () => {
    const random = new Random(5);
    const a = group(random, 5, 1);
    const b = group(random, 4, 1.2);
    const width = depth * grid.count;
    const diff = new Float64Array(width);
    for (let j = 0; j < width; j++) {
      let sa = 0;
      let sb = 0;
      for (let i = 0; i < 5; i++) sa += a.values[i * width + j];
      for (let i = 0; i < 4; i++) sb += b.values[i * width + j];
      diff[j] = sa / 5 - sb / 4;
    }
    for (const p of [1, 2, 3, Infinity]) {
      expect(permutationTest(a, b, { permutations: 9, p }).statistic).toBeCloseTo(
        sampledNorm(diff, depth, grid, p),
        12,
      );
    }
  });

  it('gives the same p-value through the Gram matrix as by re-summing the rows', () => {
    // ‖c·s_A − d·total‖² expands into Gram-matrix terms (bilinearity of the weighted inner product): the same
    // relabellings must count, whichever way they are scored.
    const random = new Random(13);
    for (let r = 0; r < 5; r++) {
      const a = group(random, 8 + r, 1);
      const b = group(random, 11, 1 + 0.1 * r);
      const direct = permutationTest(a, b, { permutations: 299, seed: r, method: 'direct' });
      const gram = permutationTest(a, b, { permutations: 299, seed: r, method: 'gram' });
      expect(gram.exceed).toBe(direct.exceed);
      expect(gram.statistic).toBe(direct.statistic);
    }
    expect(() => permutationTest(group(random, 3, 1), group(random, 3, 1), { method: 'gram', p: 1 })).toThrow(
      /needs p = 2/,
    );
  });

  it('counts the observed labelling among the permutations', () => {
    // With one sample per group there are only two labellings and both give the same |difference|, so
    // every relabelling ties with the observed one and p = (1 + R)/(1 + R) = 1.
    const random = new Random(1);
    expect(permutationTest(group(random, 1, 1), group(random, 1, 2), { permutations: 50 }).p).toBe(1);
  });
});

describe('contrastAll', () => {
  it('tests every pair of classes in every degree and applies Holm over the whole family', () => {
    const random = new Random(3);
    const classes = [
      { label: 'a', stack: group(random, 15, 1) },
      { label: 'b', stack: group(random, 15, 1) },
      { label: 'c', stack: group(random, 15, 2.5) },
    ];
    const tests = contrastAll(
      [
        { degree: 0, classes },
        { degree: 1, classes },
      ],
      { permutations: 999 },
    );
    expect(tests.map((t) => `${t.degree}:${t.a}-${t.b}`)).toEqual([
      '0:a-b',
      '0:a-c',
      '0:b-c',
      '1:a-b',
      '1:a-c',
      '1:b-c',
    ]);
    // Holm 1979: the smallest p-value is multiplied by the family size (6 here).
    const smallest = tests.reduce((m, t) => (t.p < m.p ? t : m));
    expect(smallest.pAdjusted).toBeCloseTo(Math.min(1, 6 * smallest.p), 12);
    for (const t of tests) expect(t.pAdjusted).toBeGreaterThanOrEqual(t.p);
    expect(tests.find((t) => t.a === 'a' && t.b === 'c')?.pAdjusted).toBeLessThan(0.05);
  });
});
