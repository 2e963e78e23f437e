import { describe, expect, it } from 'vitest';
import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { contrastDiagrams, contrastText } from '../../src/report/contrast.js';
import { findingsOf } from '../../src/report/findings.js';
import { type DatasetReport, renderReport } from '../../src/report/html.js';
import {
  type ContrastTest,
  PERMUTATION_BUDGET,
  permutationReach,
  permutationsForFamily,
} from '../../src/report/permutation.js';

// With R relabellings the smallest p is 1/(R + 1) (Phipson & Smyth, "Permutation P-values Should Never Be
// Zero", 2010) and Holm's correction multiplies the smallest of m p values by m (Holm, "A simple sequentially
// rejective multiple test procedure", 1979): no adjusted p falls below m/(R + 1).
describe('permutationReach', () => {
  it('puts the floor of the adjusted p at m/(R + 1) and asks for ⌈m/0.05⌉ − 1 relabellings', () => {
    const big = permutationReach(90, 999);
    expect(big.floor).toBeCloseTo(0.09, 12);
    expect(big.reachable).toBe(false);
    expect(big.needed).toBe(1799);
    expect(permutationReach(90, 1799).reachable).toBe(true);
    expect(permutationReach(90, 1798).reachable).toBe(false);
    // Exactly at the level counts as reachable (p ≤ 0.05 rejects).
    expect(permutationReach(3, 59)).toMatchObject({ floor: 0.05, reachable: true, needed: 59 });
    expect(permutationReach(6, 199)).toMatchObject({ floor: 0.03, reachable: true });
  });
});

describe('permutationsForFamily', () => {
  it('keeps the base for a small family, raises it to reach 0.01 for a large one, and stops at the budget', () => {
    expect(permutationsForFamily(6)).toBe(999);
    expect(permutationsForFamily(3, 199)).toBe(299);
    expect(permutationsForFamily(90)).toBe(8999);
    expect(permutationReach(90, permutationsForFamily(90)).floor).toBeCloseTo(0.01, 12);
    expect(permutationsForFamily(600)).toBe(PERMUTATION_BUDGET);
    expect(permutationsForFamily(600, 20_000)).toBe(20_000);
  });
});

function tests(m: number): ContrastTest[] {
  return Array.from({ length: m }, (_, i) => ({
    a: `c${i}`,
    b: `c${i + 1}`,
    degree: 1,
    statistic: 1,
    p: 1 / 10_000,
    pAdjusted: Math.min(1, m / 10_000),
    sizes: [10, 10] as [number, number],
  }));
}

describe('a family the permutations cannot reach', () => {
  it('is said to be untestable at 5% in the findings, not counted as "0 of N differ"', () => {
    const evaluation = { results: [] } as never;
    // 600 tests at the budget of 9,999 relabellings: the floor is 600/10,000 = 0.06 > 0.05.
    const said = findingsOf(evaluation, tests(600), PERMUTATION_BUDGET);
    expect(said).toHaveLength(1);
    expect(said[0]).toBe(
      'None of the 600 class-pair × degree contrasts can reach the 5% level with 9,999 permutations per test: ' +
        "under Holm's correction over 600 tests the smallest possible adjusted p is 0.060, whatever the data. " +
        'At least 11,999 permutations per test are needed; until then "no difference found" means "not tested".',
    );
    expect(said[0]).not.toMatch(/0 of 600/);
    // A reachable family is still counted.
    expect(findingsOf(evaluation, tests(6), 999)[0]).toMatch(/^6 of 6 class-pair × degree contrasts show/);
  });

  it('is said to be untestable in the report part and its table', async () => {
    const family = tests(600);
    const dataset: DatasetReport = {
      name: 'many classes',
      summary: { kind: 'diagrams', samples: 20, classes: [{ label: 'c0', count: 10 }] },
      options: {},
      accuracy: [],
      confusions: [],
      means: [],
      contrasts: family,
      contrastReach: permutationReach(family.length, PERMUTATION_BUDGET),
      examples: [],
    };
    const html = await renderReport({ title: 't', version: '0', command: 'test', datasets: [dataset] });
    const part = html.slice(html.indexOf('data-part="contrasts"'));
    expect(part).toContain('data-reach="unreachable"');
    expect(part).toContain('At least 11,999 permutations per test are needed');
    expect(part).toContain('<td>not testable</td>');
    expect(part).not.toContain('<td>no evidence</td>');
    expect(part).not.toMatch(/of which differ at 5%/);
  });
});

/** Eleven classes whose H1 bars grow with the class index: 55 pairs, every one clearly different. */
function elevenClasses(): DiagramSet[] {
  const random = new Random(2024);
  const out: DiagramSet[] = [];
  for (let c = 0; c < 11; c++) {
    for (let i = 0; i < 10; i++) {
      const pairs: Array<[number, number]> = [];
      for (let p = 0; p < 3; p++) {
        const b = random.uniform(0, 0.2);
        pairs.push([b, b + (1 + c) * random.uniform(0.95, 1.05)]);
      }
      out.push({
        sample: `k${c}-${i}`,
        label: `k${String(c).padStart(2, '0')}`,
        diagrams: [makeDiagram(1, pairs)],
      });
    }
  }
  return out;
}

describe('contrastDiagrams with the permutations chosen for the family', () => {
  it('raises them for 55 tests and reaches a small adjusted p that 999 cannot', () => {
    const sets = elevenClasses();
    const raised = contrastDiagrams(sets, { degrees: [1], gridSize: 60 });
    expect(raised.tests).toHaveLength(55);
    expect(raised.permutations).toBe(5499);
    // Class c's bars are about 1 + c long with a ±5% spread, so no two classes overlap and no relabelling
    // is as extreme as the observed one: p = 1/5,500 and, over 55 tests, adjusted 55/5,500 = 0.01.
    const first = raised.tests.find((t) => t.a === 'k00' && t.b === 'k10');
    expect(first?.p).toBeCloseTo(1 / 5500, 12);
    expect(first?.pAdjusted).toBeCloseTo(0.01, 12);
    expect(raised.tests.every((t) => t.pAdjusted <= 0.05)).toBe(true);
    // With 999 fixed, the same clear differences cannot reach 5%: the floor is 55/1,000 = 0.055.
    const fixed = contrastDiagrams(sets, { degrees: [1], gridSize: 60, permutations: 999 });
    expect(fixed.permutations).toBe(999);
    expect(Math.min(...fixed.tests.map((t) => t.pAdjusted))).toBeCloseTo(0.055, 12);
    expect(contrastText(fixed)).toContain(
      'None of the 55 tests can reach the 5% level with 999 permutations',
    );
    expect(contrastText(raised)).not.toContain('None of the');
  });
});
