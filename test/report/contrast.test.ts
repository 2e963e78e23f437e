import { describe, expect, it } from 'vitest';
import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { contrastDiagrams, contrastJson, contrastText } from '../../src/report/contrast.js';

/** Diagram sets made here: class `wide` has H1 bars twice as long as class `narrow`; H0 is the same law. */
function sets(): DiagramSet[] {
  const random = new Random(77);
  const out: DiagramSet[] = [];
  for (const [label, life] of [
    ['narrow', 0.5],
    ['wide', 1],
  ] as const) {
    for (let i = 0; i < 15; i++) {
      const h0: Array<[number, number]> = [[0, Infinity]];
      const h1: Array<[number, number]> = [];
      for (let p = 0; p < 3; p++) {
        h0.push([0, random.uniform(0.1, 0.4)]);
        const b = random.uniform(0, 0.5);
        h1.push([b, b + life * random.uniform(0.6, 1.4)]);
      }
      out.push({ sample: `${label}-${i}`, label, diagrams: [makeDiagram(0, h0), makeDiagram(1, h1)] });
    }
  }
  return out;
}

describe('contrastDiagrams', () => {
  it('finds the H1 difference, none in H0, and writes the JSON contract', () => {
    const result = contrastDiagrams(sets(), { degrees: [0, 1], permutations: 499, gridSize: 80 });
    expect(result.classes).toEqual(['narrow', 'wide']);
    expect(result.grids.map((g) => g.degree)).toEqual([0, 1]);
    const [h0, h1] = result.tests;
    // Robinson & Turner 2017: a real difference in means gives a p near its floor 1/(1 + R); Holm over the
    // two tests (Holm 1979) at most doubles it.
    expect(h1.p).toBeLessThan(0.01);
    expect(h1.pAdjusted).toBeCloseTo(Math.min(1, 2 * h1.p), 12);
    // Same law in H0: no evidence at 1% (a loose check, common practice, no source).
    expect(h0.p).toBeGreaterThan(0.01);
    const json = JSON.parse(contrastJson(result, { seed: 1 })) as {
      seed: number;
      tests: Array<Record<string, unknown>>;
    };
    expect(json.seed).toBe(1);
    expect(json.tests.map((t) => Object.keys(t))).toEqual([
      ['a', 'b', 'degree', 'statistic', 'p', 'pAdjusted'],
      ['a', 'b', 'degree', 'statistic', 'p', 'pAdjusted'],
    ]);
    const text = contrastText(result, 499);
    expect(text).toContain(
      '2 tests (every pair of classes × degree), Holm-corrected together; 499 permutations each',
    );
    expect(text).toContain('no adjusted p can fall below 0.0040');
  });
});

describe('contrastDiagrams with several filtrations', () => {
  it('tests every filtration × degree as its own channel, Holm-corrected as one family', () => {
    // Filtration 'first' is the sets as they are (H1 differs); 'second' repeats their H0 diagrams only.
    const base = sets();
    const tagged: DiagramSet[] = base.map((s) => ({
      ...s,
      diagrams: [
        ...s.diagrams.map((d) => ({ ...d, filtration: 'first' })),
        { ...s.diagrams[0], filtration: 'second' },
      ],
    }));
    const result = contrastDiagrams(tagged, { degrees: [0, 1], permutations: 199, gridSize: 60 });
    expect(result.grids.map((g) => `${g.filtration}/${g.degree}`)).toEqual([
      'first/0',
      'first/1',
      'second/0',
      'second/1',
    ]);
    const plain = contrastDiagrams(base, { degrees: [0, 1], permutations: 199, gridSize: 60 });
    // The first filtration's statistics are the untagged ones (same grid, same stacks).
    expect(result.tests[0].statistic).toBe(plain.tests[0].statistic);
    expect(result.tests[1].statistic).toBe(plain.tests[1].statistic);
    // The second filtration's H0 is the same diagrams as the first's: same statistic; its H1 is empty.
    expect(result.tests[2].statistic).toBe(plain.tests[0].statistic);
    expect(result.tests[3].statistic).toBe(0);
    // Holm 1979 over four tests: the smallest p is multiplied by 4.
    const ps = result.tests.map((t) => t.p);
    const smallest = ps.indexOf(Math.min(...ps));
    expect(result.tests[smallest].pAdjusted).toBeCloseTo(Math.min(1, 4 * ps[smallest]), 12);
    expect(contrastText(result, 199)).toContain('second/H1');
    const json = JSON.parse(contrastJson(result)) as { tests: Array<Record<string, unknown>> };
    expect(json.tests[2]).toMatchObject({ degree: 0, filtration: 'second' });
  });
});
