import { describe, expect, it } from 'vitest';
import { type DiagramSet, makeDiagram } from '../../src/core/diagram.js';
import { Random } from '../../src/core/random.js';
import { renderSvg } from '../../src/report/charts.js';
import {
  chooseMapChannel,
  diagramDistanceMap,
  distanceMapChart,
  evenSubsample,
} from '../../src/report/distance-map.js';
import type { ContrastTest } from '../../src/report/permutation.js';

const drop = { mode: 'drop' } as const;

/**
 * Four samples, listed out of class order, with H1 diagrams small enough to match by hand. The bottleneck
 * distance is the least, over bijections that may send points to the diagonal, of the largest L∞ move
 * (Edelsbrunner and Harer, "Computational Topology: An Introduction", 2010, §VIII.2). By hand:
 *   a1 {(0,2)} – a2 {(0,2.5)}: match the two points, move max(0, 0.5) = 0.5 (both to the diagonal: 1.25).
 *   a1 – b1 {(1,5)}: point to point max(1, 3) = 3; both to the diagonal max(1, 2) = 2; so 2.
 *   b1 – b2 {(1,5),(3,3.4)}: (1,5) to itself, (3,3.4) to the diagonal at (3.4 − 3)/2 = 0.2; so 0.2.
 *   a2 – b1: point to point max(1, 2.5) = 2.5; both to the diagonal max(1.25, 2) = 2; so 2.
 * b2 also has an essential H1 class, dropped as the landscapes drop it.
 */
function handSets(): DiagramSet[] {
  const h1 = (pairs: Array<[number, number]>) => [makeDiagram(0, [[0, Infinity]]), makeDiagram(1, pairs)];
  return [
    { sample: 'b1', label: 'b', diagrams: h1([[1, 5]]) },
    { sample: 'a1', label: 'a', diagrams: h1([[0, 2]]) },
    {
      sample: 'b2',
      label: 'b',
      diagrams: h1([
        [1, 5],
        [3, 3.4],
        [0.5, Infinity],
      ]),
    },
    { sample: 'a2', label: 'a', diagrams: h1([[0, 2.5]]) },
  ];
}

describe('diagramDistanceMap', () => {
  it('orders samples by class, marks the boundary and matches hand-computed bottleneck distances', () => {
    const map = diagramDistanceMap(handSets(), { degree: 1 }, { perClass: 10, seed: 1, infinite: drop });
    expect(map.samples.map((s) => s.id)).toEqual(['a1', 'a2', 'b1', 'b2']);
    expect(map.boundaries).toEqual([2]);
    const n = 4;
    const at = (a: string, b: string) =>
      map.distances[map.samples.findIndex((s) => s.id === a) * n + map.samples.findIndex((s) => s.id === b)];
    expect(at('a1', 'a2')).toBeCloseTo(0.5, 12);
    expect(at('a1', 'b1')).toBeCloseTo(2, 12);
    expect(at('b1', 'b2')).toBeCloseTo(0.2, 12);
    expect(at('a2', 'b1')).toBeCloseTo(2, 12);
    for (let i = 0; i < n; i++) {
      expect(map.distances[i * n + i]).toBe(0);
      for (let j = 0; j < n; j++) expect(map.distances[i * n + j]).toBe(map.distances[j * n + i]);
    }
  });

  it('draws at most perClass samples of every class, evenly and reproducibly from the seed', () => {
    const random = new Random(5);
    const sets: DiagramSet[] = [];
    for (let i = 0; i < 40; i++) {
      const label = i % 4 === 0 ? 'rare' : i % 2 === 0 ? 'even' : 'odd';
      const b = random.uniform(0, 1);
      sets.push({ sample: `s${i}`, label, diagrams: [makeDiagram(1, [[b, b + random.uniform(0.1, 1)]])] });
    }
    const map = diagramDistanceMap(sets, { degree: 1 }, { perClass: 6, seed: 3, infinite: drop });
    const counts = new Map<string, number>();
    for (const s of map.samples) counts.set(s.label, (counts.get(s.label) ?? 0) + 1);
    expect(Object.fromEntries(counts)).toEqual({ even: 6, odd: 6, rare: 6 });
    // Ordered by class (classes sorted), each class in data order; boundaries where the class changes.
    expect(map.samples.map((s) => s.label)).toEqual([
      ...Array(6).fill('even'),
      ...Array(6).fill('odd'),
      ...Array(6).fill('rare'),
    ]);
    expect(map.boundaries).toEqual([6, 12]);
    const evens = map.samples.filter((s) => s.label === 'even').map((s) => Number(s.id.slice(1)));
    expect(evens).toEqual([...evens].sort((a, b) => a - b));
    expect(map.total).toBe(40);
    // Same seed, same draw; another seed, another draw.
    const labels = sets.map((s) => s.label);
    const classes = ['even', 'odd', 'rare'];
    expect(evenSubsample(labels, classes, 6, 3)).toEqual(evenSubsample(labels, classes, 6, 3));
    expect(Array.from(evenSubsample(labels, classes, 6, 4))).not.toEqual(
      Array.from(evenSubsample(labels, classes, 6, 3)),
    );
    // A class smaller than the cap gives all its samples.
    // even and rare have 10 samples each, odd 20.
    expect(evenSubsample(labels, classes, 15, 1).length).toBe(10 + 15 + 10);
  });
});

describe('chooseMapChannel', () => {
  const contrast = (degree: number, pAdjusted: number): ContrastTest => ({
    a: 'a',
    b: 'b',
    degree,
    statistic: 1,
    p: pAdjusted / 2,
    pAdjusted,
    sizes: [2, 2],
  });
  it('takes the channel whose contrasts are clearest, unless its diagrams are too large for the budget', () => {
    const sets: DiagramSet[] = ['a', 'a', 'b', 'b'].map((label, i) => ({
      sample: `s${i}`,
      label,
      diagrams: [
        makeDiagram(
          0,
          Array.from({ length: 100 }, (_, k) => [0, 1 + k / 100] as [number, number]),
        ),
        makeDiagram(1, [[0, 1 + i]]),
      ],
    }));
    const channels = [{ degree: 0 }, { degree: 1 }];
    const clearH0 = [contrast(0, 0.01), contrast(1, 0.5)];
    const roomy = chooseMapChannel(sets, channels, clearH0, { infinite: drop, cap: 40, work: 1e9 });
    expect(roomy?.channel).toEqual({ degree: 0 });
    expect(roomy?.perClass).toBe(20);
    expect(roomy?.reason).toBe(
      'H0 is the channel whose class contrasts are clearest (1 of its 1 pairs differ at 5% after Holm)',
    );
    // 45 pairs (10 samples) of 100-point diagrams is 450,000 units: over a 100,000 budget, so H0 affords
    // fewer than 5 per class and the small H1 diagrams are drawn instead.
    const tight = chooseMapChannel(sets, channels, clearH0, { infinite: drop, cap: 40, work: 1e5 });
    expect(tight?.channel).toEqual({ degree: 1 });
    expect(tight?.reason).toBe('H1 is the only channel whose map fits the time budget');
  });
});

describe('distanceMapChart', () => {
  it('renders the cells, the class strip and the boundary lines', async () => {
    const map = diagramDistanceMap(handSets(), { degree: 1 }, { perClass: 10, seed: 1, infinite: drop });
    const spec = distanceMapChart(map, ['a', 'b']) as unknown as {
      layer: Array<{ data: { values: unknown[] } }>;
    };
    expect(spec.layer[0].data.values).toHaveLength(16);
    expect(spec.layer[1].data.values).toHaveLength(4);
    expect(spec.layer[2].data.values).toEqual([{ at: 2 }]);
    const svg = await renderSvg(distanceMapChart(map, ['a', 'b']));
    expect(svg).toContain('H1 · loops · bottleneck distance');
  });
});
